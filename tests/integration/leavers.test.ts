// Leavers and agency staff: a contract ends at the end of its last day in the plant's zone (the
// job deactivates the person at that instant, ends their sessions, the gate denies), the job is
// idempotent, a manual deactivation records the plant date, and a rehire brings back the same
// identity with its history.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { appDb, createTestPerson, queryRows, type TestPerson } from '../helpers/db';
import { signInWithBadge, type HttpClient } from '../helpers/http-session';
import { useDemoSession } from '../helpers/lifecycle';
import { personRow } from '../helpers/retention-fixtures';
import {
	insertCertificate,
	makeProcess,
	makeRule,
	makeStation
} from '../helpers/training-fixtures';
import { pool } from '../../src/lib/server/db';
import { endExpiredContracts } from '../../src/lib/server/people/leavers';
import { checkStationAccess, nextPlantMidnight } from '../../src/lib/server/gate';
import { addMonthsToDate } from '../../src/lib/server/certificates/issue';
import { localDate } from '../../src/lib/time';
import { JOBS } from '../../src/lib/server/jobs/scheduler';

const ZONE = 'Asia/Ho_Chi_Minh';
const admin = useDemoSession('admin');

// The contract's last day is 2 December 2026 in Ho Chi Minh City (UTC+7, no DST): it covers the
// whole plant day, which ends at 2026-12-03 00:00 +07:00 = 2026-12-02T17:00:00.000Z.
const LAST_DAY = '2026-12-02';
const JUST_BEFORE = new Date('2026-12-02T16:59:59.999Z');
const AT_END = new Date('2026-12-02T17:00:00.000Z');

let agency: TestPerson;
let station: { id: number; code: string };
let certificateId: number;
const sessionId = () => `leavers-test-${agency.id}`;

async function auditCount(action: string, personId: number) {
	const [row] = await queryRows<{ n: number }>(
		appDb(),
		'SELECT COUNT(*) AS n FROM audit_events WHERE action = ? AND entity_id = ?',
		[action, String(personId)]
	);
	return Number(row.n);
}

async function gate(now: Date) {
	return checkStationAccess({ station: station.code, badge: agency.badge!, source: 'kiosk' }, now);
}

async function expectSignedOut(client: HttpClient) {
	const res = await client.get('/');
	expect(res.status).toBe(303);
	expect(res.headers.get('location')).toBe('/signin?redirectTo=%2F');
}

beforeAll(async () => {
	agency = await createTestPerson({
		roles: ['operator'],
		employmentType: 'agency',
		contractEndsOn: LAST_DAY,
		withEmail: false
	});
	const proc = await makeProcess();
	const ruleId = await makeRule({
		processId: proc.id,
		createdBy: agency.id,
		instructionIds: [],
		activeFrom: new Date('2026-01-01T00:00:00Z')
	});
	station = await makeStation([proc.id]);
	certificateId = await insertCertificate(agency.id, proc.id, ruleId, {
		issuedAt: new Date('2026-06-01T03:00:00Z'),
		expiresAt: new Date('2027-06-01T17:00:00Z')
	});
	// A session opened on the last day.
	await appDb().query(
		`INSERT INTO auth_sessions (id, person_id, session_version, method, created_at, expires_at)
		 VALUES (?, ?, 1, 'badge', ?, ?)`,
		[sessionId(), agency.id, new Date('2026-12-02T01:00:00Z'), new Date('2027-12-02T00:00:00Z')]
	);
});

afterAll(async () => {
	await pool.end();
});

describe('an agency contract ending', () => {
	it('is still active at 16:59:59.999Z on its last day, and the gate still allows', async () => {
		await endExpiredContracts(JUST_BEFORE);
		expect(await personRow(agency.id)).toMatchObject({ active: 1, employment_ended_on: null });
		const answer = await gate(JUST_BEFORE);
		expect(answer.decision).toBe('allow');
		expect(answer.warnings.map((w) => w.code)).toContain('contract_ending');
	});

	it('is deactivated by the job at 17:00:00.000Z: sessions ended, the gate denies', async () => {
		const v = (await personRow(agency.id)).session_version;
		const result = await endExpiredContracts(AT_END);
		expect(result.deactivated).toBeGreaterThanOrEqual(1);
		expect(await personRow(agency.id)).toMatchObject({
			active: 0,
			employment_ended_on: LAST_DAY,
			session_version: v + 1
		});
		const [session] = await queryRows<{ revoked_at: Date | null }>(
			appDb(),
			'SELECT revoked_at FROM auth_sessions WHERE id = ?',
			[sessionId()]
		);
		expect(session.revoked_at).toEqual(AT_END);
		const answer = await gate(AT_END);
		expect(answer.decision).toBe('deny');
		expect(answer.reasons.map((r) => r.code)).toEqual(['inactive_person']);
		const [event] = await queryRows<{ reason: string; new_values: Record<string, unknown> }>(
			appDb(),
			"SELECT reason, new_values FROM audit_events WHERE action = 'person.contract_ended' AND entity_id = ?",
			[String(agency.id)]
		);
		expect(event.reason).toBe(`contract ended at the end of ${LAST_DAY} (${ZONE})`);
		expect(event.new_values).toMatchObject({ active: false, employmentEndedOn: LAST_DAY });
	});

	it('changes nothing when the job runs again', async () => {
		const before = await personRow(agency.id);
		const result = await endExpiredContracts(AT_END);
		expect(result.deactivated).toBe(0);
		expect(await personRow(agency.id)).toEqual(before);
		expect(await auditCount('person.contract_ended', agency.id)).toBe(1);
	});

	it('signs out a live session the moment the job deactivates the person', async () => {
		// Real time here: a contract that ends today, a real sign-in, the job at the day's end.
		const today = localDate(new Date(), ZONE);
		const p = await createTestPerson({
			roles: ['operator'],
			employmentType: 'agency',
			contractEndsOn: today,
			withEmail: false
		});
		const client = await signInWithBadge(p.badge!, p.pin);
		expect((await client.get('/')).status).toBe(200);
		await endExpiredContracts(nextPlantMidnight(today, ZONE));
		await expectSignedOut(client);
	});
});

describe('the scheduled job', () => {
	it('is registered with the scheduler to run every minute', () => {
		const job = JOBS.find((j) => j.name === 'contract-ends');
		expect(job?.intervalMs).toBe(60_000);
	});
});

describe('rehire', () => {
	const today = () => localDate(new Date(), ZONE);

	it('refuses a missing, past or impossible contract end for agency staff, on the field', async () => {
		for (const [contractEndsOn, message] of [
			['', 'Agency staff need the new contract’s last day.'],
			['2020-01-31', 'That day has passed'],
			['2026-02-30', 'Use a real date (YYYY-MM-DD)'],
			[addMonthsToDate(today(), 12 * 11), 'At most 10 years ahead']
		]) {
			const res = await admin.client.postForm(`/admin/people/${agency.id}?/reactivate`, {
				reason: 'new contract',
				contractEndsOn
			});
			expect(res.status, contractEndsOn).toBe(400);
			expect(await res.text(), contractEndsOn).toContain(message);
		}
		expect((await personRow(agency.id)).active).toBe(0);
	});

	it('reactivates the same identity with its history', async () => {
		const before = await personRow(agency.id);
		const [gateBefore] = await queryRows<{ n: number }>(
			appDb(),
			'SELECT COUNT(*) AS n FROM gate_checks WHERE person_id = ?',
			[agency.id]
		);
		const newEnd = addMonthsToDate(today(), 6);
		const res = await admin.client.postForm(`/admin/people/${agency.id}?/reactivate`, {
			reason: 'new contract with Mekong Staffing',
			contractEndsOn: newEnd
		});
		expect(res.status).toBe(303);
		const after = await personRow(agency.id);
		expect(after).toMatchObject({
			employee_no: before.employee_no,
			badge_no: before.badge_no,
			display_name: before.display_name,
			active: 1,
			employment_ended_on: null
		});
		const [row] = await queryRows<{ contract_ends_on: string }>(
			appDb(),
			"SELECT DATE_FORMAT(contract_ends_on, '%Y-%m-%d') AS contract_ends_on FROM people WHERE id = ?",
			[agency.id]
		);
		expect(row.contract_ends_on).toBe(newEnd);
		const [cert] = await queryRows<{ person_id: number }>(
			appDb(),
			'SELECT person_id FROM certificates WHERE id = ?',
			[certificateId]
		);
		expect(cert.person_id).toBe(agency.id);
		const [gateAfter] = await queryRows<{ n: number }>(
			appDb(),
			'SELECT COUNT(*) AS n FROM gate_checks WHERE person_id = ?',
			[agency.id]
		);
		expect(Number(gateAfter.n)).toBe(Number(gateBefore.n));
		expect(Number(gateBefore.n)).toBe(2);
		const [event] = await queryRows<{ reason: string; old_values: unknown; new_values: unknown }>(
			appDb(),
			"SELECT reason, old_values, new_values FROM audit_events WHERE action = 'person.rehired' AND entity_id = ?",
			[String(agency.id)]
		);
		expect(event).toEqual({
			reason: 'new contract with Mekong Staffing',
			old_values: { active: false, employmentEndedOn: LAST_DAY, contractEndsOn: LAST_DAY },
			new_values: { active: true, employmentEndedOn: null, contractEndsOn: newEnd }
		});
		// The old badge signs in again.
		const client = await signInWithBadge(agency.badge!, agency.pin);
		expect((await client.get('/')).status).toBe(200);
	});
});

describe('manual deactivation', () => {
	it('records the plant date as the end of employment and ends the sessions', async () => {
		const p = await createTestPerson({ roles: ['operator'], withEmail: false });
		const client = await signInWithBadge(p.badge!, p.pin);
		const res = await admin.client.postForm(`/admin/people/${p.id}?/deactivate`, {
			reason: 'left the company'
		});
		expect(res.status).toBe(303);
		expect(await personRow(p.id)).toMatchObject({
			active: 0,
			employment_ended_on: localDate(new Date(), ZONE)
		});
		await expectSignedOut(client);
		const page = await (await admin.client.get(`/admin/people/${p.id}`)).text();
		expect(page).toContain('Rehire');
	});
});
