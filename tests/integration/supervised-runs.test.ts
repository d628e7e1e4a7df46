// Supervised runs against the real database: who may grant, how long a run may last, and the
// gate's answer at the boundaries (allowed from the grant until the exact end instant, denied at it;
// a revoked run stops at once). Every grant and revoke is audited and the grant queues its mail.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import {
	appDb,
	closeDbHelpers,
	createTestPerson,
	queryRows,
	retireTestPeople,
	type TestPerson
} from '../helpers/db';
import {
	insertCertificate,
	makeProcess,
	makeRule,
	makeStation
} from '../helpers/training-fixtures';
import { pool } from '../../src/lib/server/db';
import { checkStationAccess } from '../../src/lib/server/gate';
import {
	FALLBACK_RUN_LIMIT_MS,
	grantSupervisedRun,
	revokeSupervisedRun,
	untilFromWallClock
} from '../../src/lib/server/gate/supervised';
import { Refusal } from '../../src/lib/server/errors';
import type { Role } from '../../src/lib/roles';

const HOUR = 3_600_000;
const ZONE = 'Asia/Ho_Chi_Minh';
let siteId: number;
let leadL1: TestPerson;
let leadL2: TestPerson;
let operator: TestPerson;
let supervisor: TestPerson;
let unqualified: TestPerson;
let station: { id: number; code: string };

const granterOf = (p: TestPerson) => ({
	id: p.id,
	roles: p.roles as Role[],
	siteId,
	timeZone: ZONE
});
const actorOf = (p: TestPerson) => ({ id: p.id, label: p.displayName });

function grant(
	by: TestPerson,
	over: Partial<{ personId: number; supervisorId: number; until: Date; reason: string }> = {},
	now = new Date()
) {
	return grantSupervisedRun(
		actorOf(by),
		granterOf(by),
		{
			personId: over.personId ?? operator.id,
			stationId: station.id,
			supervisorId: over.supervisorId ?? supervisor.id,
			reason: over.reason ?? 'Recertification practical booked for Thursday',
			until: over.until ?? new Date(now.getTime() + 2 * HOUR)
		},
		now
	);
}

async function refusalOf(p: Promise<unknown>): Promise<Refusal> {
	const err = await p.then(
		() => null,
		(e: unknown) => e
	);
	expect(err).toBeInstanceOf(Refusal);
	return err as Refusal;
}

const gateAt = (badge: string, at: Date) =>
	checkStationAccess({ station: station.code, badge, source: 'api' }, at);

beforeAll(async () => {
	[{ id: siteId }] = await queryRows<{ id: number }>(
		appDb(),
		"SELECT id FROM sites WHERE code = 'KBO-2'"
	);
	leadL1 = await createTestPerson({ roles: ['lead'], line: 'L1' });
	leadL2 = await createTestPerson({ roles: ['lead'], line: 'L2' });
	operator = await createTestPerson({ roles: ['operator'], line: 'L1', withEmail: false });
	supervisor = await createTestPerson({ roles: ['operator'], line: 'L1' });
	unqualified = await createTestPerson({ roles: ['operator'], line: 'L1' });
	const proc = await makeProcess();
	const ruleId = await makeRule({ processId: proc.id, createdBy: leadL1.id, instructionIds: [] });
	station = await makeStation([proc.id]); // on line L1
	await insertCertificate(supervisor.id, proc.id, ruleId, {
		expiresAt: new Date(Date.now() + 200 * 86_400_000)
	});
	await insertCertificate(unqualified.id, proc.id, ruleId, {
		state: 'expired',
		expiresAt: new Date(Date.now() - 86_400_000)
	});
});
afterAll(async () => {
	await retireTestPeople();
	await closeDbHelpers();
	await pool.end();
});

describe('supervised runs at the gate', () => {
	it('allows with reason supervised from the grant until the exact end instant, denies at it', async () => {
		const t0 = new Date();
		const end = new Date(t0.getTime() + 2 * HOUR);
		// Before any run: the operator has no certificate.
		const before = await gateAt(operator.badge!, t0);
		expect(before.decision).toBe('deny');
		expect(before.reasons.map((r) => r.code)).toEqual(['missing']);

		const run = await grant(leadL1, { until: end }, t0);
		expect(run.endsAt.getTime()).toBe(end.getTime());

		const justAfter = await gateAt(operator.badge!, new Date(t0.getTime() + 1));
		expect(justAfter.decision).toBe('allow');
		expect(justAfter.reasons[0].code).toBe('supervised');
		expect(justAfter.reasons[0].detail).toContain(supervisor.displayName);
		expect(justAfter.validUntil?.getTime()).toBe(end.getTime());

		const lastMs = await gateAt(operator.badge!, new Date(end.getTime() - 1));
		expect(lastMs.decision).toBe('allow');
		const atEnd = await gateAt(operator.badge!, end);
		expect(atEnd.decision).toBe('deny');
		expect(atEnd.reasons.map((r) => r.code)).toEqual(['missing']);

		// Audited with the reason, and both mails queued in the same transaction.
		const audit = await queryRows<{ action: string; reason: string }>(
			appDb(),
			"SELECT action, reason FROM audit_events WHERE entity_type = 'supervised_run' AND entity_id = ?",
			[String(run.id)]
		);
		expect(audit).toEqual([
			{ action: 'supervised_run.granted', reason: 'Recertification practical booked for Thursday' }
		]);
		const mail = await queryRows<{ dedupe_key: string; kind: string }>(
			appDb(),
			'SELECT dedupe_key, kind FROM mail_outbox WHERE dedupe_key LIKE ? ORDER BY dedupe_key',
			[`supervised_run:run:${run.id}:%`]
		);
		// The operator has no address: their mail goes to the line's leads; the supervisor's to them.
		const keys = mail.map((m) => m.dedupe_key);
		expect(keys).toContain(`supervised_run:run:${run.id}:person:via:${leadL1.id}`);
		expect(keys).toContain(`supervised_run:run:${run.id}:supervisor`);
		expect(mail.every((m) => m.kind === 'supervised_run')).toBe(true);

		// A second run for the same person and station while this one is open is refused.
		const dup = await refusalOf(grant(leadL1, {}, new Date(t0.getTime() + 1000)));
		expect(dup.status).toBe(409);
		expect(Object.keys(dup.fields ?? {})).toEqual(['personId']);
		await revokeSupervisedRun(actorOf(leadL1), granterOf(leadL1), run.id, 'cleanup');
	});

	it('a revoked run stops at once, and the revoke is audited', async () => {
		const person = await createTestPerson({ roles: ['operator'], line: 'L1' });
		const t0 = new Date();
		const run = await grant(leadL1, { personId: person.id }, t0);
		expect((await gateAt(person.badge!, new Date())).decision).toBe('allow');
		await revokeSupervisedRun(actorOf(leadL1), granterOf(leadL1), run.id, 'Supervisor called away');
		const after = await gateAt(person.badge!, new Date());
		expect(after.decision).toBe('deny');
		expect(after.reasons.map((r) => r.code)).toEqual(['missing']);
		const [row] = await queryRows<{ revoked_at: Date | null; revoke_reason: string }>(
			appDb(),
			'SELECT revoked_at, revoke_reason FROM supervised_runs WHERE id = ?',
			[run.id]
		);
		expect(row.revoked_at).not.toBeNull();
		expect(row.revoke_reason).toBe('Supervisor called away');
		const audit = await queryRows<{ action: string; reason: string }>(
			appDb(),
			"SELECT action, reason FROM audit_events WHERE entity_type = 'supervised_run' AND entity_id = ? ORDER BY seq",
			[String(run.id)]
		);
		expect(audit.map((a) => a.action)).toEqual([
			'supervised_run.granted',
			'supervised_run.revoked'
		]);
		expect(audit[1].reason).toBe('Supervisor called away');
		// Revoking twice is refused.
		const again = await refusalOf(
			revokeSupervisedRun(actorOf(leadL1), granterOf(leadL1), run.id, 'twice')
		);
		expect(again.status).toBe(409);
	});
});

describe('who may grant, and for how long', () => {
	it('refuses a run longer than the person’s shift, with a field error on until', async () => {
		const person = await createTestPerson({ roles: ['operator'], line: 'L1' });
		const [shift] = await queryRows<{ id: number }>(
			appDb(),
			"SELECT sh.id FROM shifts sh JOIN sites s ON s.id = sh.site_id WHERE s.code = 'KBO-2' AND sh.code = 'A'"
		);
		await appDb().query('UPDATE people SET shift_id = ? WHERE id = ?', [shift.id, person.id]);
		const t0 = new Date();
		// Early shift 06:00–14:00: eight hours is the limit.
		const tooLong = await refusalOf(
			grant(leadL1, { personId: person.id, until: new Date(t0.getTime() + 8 * HOUR + 60_000) }, t0)
		);
		expect(tooLong.status).toBe(400);
		expect(Object.keys(tooLong.fields ?? {})).toEqual(['until']);
		expect(tooLong.fields!.until).toMatch(/one shift.*shift A, 06:00–14:00: 8 h/);
		const ok = await grant(
			leadL1,
			{ personId: person.id, until: new Date(t0.getTime() + 8 * HOUR) },
			t0
		);
		await revokeSupervisedRun(actorOf(leadL1), granterOf(leadL1), ok.id, 'cleanup');
	});

	it('without a shift on record, at most 12 hours; the end must be in the future', async () => {
		const person = await createTestPerson({ roles: ['operator'], line: 'L1' });
		const t0 = new Date();
		const over = await refusalOf(
			grant(
				leadL1,
				{ personId: person.id, until: new Date(t0.getTime() + FALLBACK_RUN_LIMIT_MS + 1) },
				t0
			)
		);
		expect(over.fields?.until).toMatch(/12 h/);
		const past = await refusalOf(
			grant(leadL1, { personId: person.id, until: new Date(t0.getTime() - 1) }, t0)
		);
		expect(past.fields?.until).toMatch(/future/);
		const atNow = await refusalOf(grant(leadL1, { personId: person.id, until: t0 }, t0));
		expect(atNow.fields?.until).toMatch(/future/);
	});

	it('refuses a supervisor who is not qualified for the station now, or who is the person', async () => {
		const person = await createTestPerson({ roles: ['operator'], line: 'L1' });
		const r = await refusalOf(grant(leadL1, { personId: person.id, supervisorId: unqualified.id }));
		expect(Object.keys(r.fields ?? {})).toEqual(['supervisorId']);
		expect(r.fields!.supervisorId).toMatch(/not qualified/);
		expect(r.fields!.supervisorId).toMatch(/certificate expired/);
		const self = await refusalOf(
			grant(leadL1, { personId: supervisor.id, supervisorId: supervisor.id })
		);
		expect(Object.keys(self.fields ?? {})).toEqual(['supervisorId']);
		const none = await queryRows(
			appDb(),
			'SELECT id FROM supervised_runs WHERE person_id IN (?, ?)',
			[person.id, supervisor.id]
		);
		expect(none).toEqual([]);
	});

	it('refuses a lead of another line; quality may grant anywhere', async () => {
		const person = await createTestPerson({ roles: ['operator'], line: 'L1' });
		const r = await refusalOf(grant(leadL2, { personId: person.id }));
		expect(r.status).toBe(403);
		expect(Object.keys(r.fields ?? {})).toEqual(['stationId']);
		expect(r.fields!.stationId).toMatch(/own line/);
		// The other line's lead cannot end a run here either: it answers like a missing run.
		const quality = await createTestPerson({ roles: ['quality'] });
		const run = await grant(quality, { personId: person.id });
		const hidden = await refusalOf(
			revokeSupervisedRun(actorOf(leadL2), granterOf(leadL2), run.id, 'not mine')
		);
		expect(hidden.status).toBe(404);
		await revokeSupervisedRun(actorOf(quality), granterOf(quality), run.id, 'cleanup');
	});

	it('turns the wall-clock end time into the next such instant in the plant zone', () => {
		// 2026-06-01 10:00 in Ho Chi Minh City (UTC+7) is 03:00 UTC.
		const now = new Date('2026-06-01T03:00:00Z');
		expect(untilFromWallClock('14:00', ZONE, now).toISOString()).toBe('2026-06-01T07:00:00.000Z');
		// 09:00 has passed today: tomorrow 09:00.
		expect(untilFromWallClock('09:00', ZONE, now).toISOString()).toBe('2026-06-02T02:00:00.000Z');
		expect(untilFromWallClock('10:00', ZONE, now).toISOString()).toBe('2026-06-02T03:00:00.000Z');
	});
});
