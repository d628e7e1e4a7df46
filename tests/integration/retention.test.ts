// Retention against the real MariaDB, the S3 fake and the built server: the dry run's plan is
// exactly what the real run then does; a second run changes nothing; a legal hold keeps a person
// and their gate rows untouched until it is released; an anonymised person keeps certificates,
// attempts and acknowledgements with their numbers and dates but loses name and identifiers,
// which are never handed out again; the page's actions refuse other roles and bad input.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { tmpdir } from 'node:os';
import { mkdtemp } from 'node:fs/promises';
import { DEMO_PASSWORD } from '../../scripts/demo-accounts.js';
import { appDb, createTestPerson, queryRows, type TestPerson } from '../helpers/db';
import { signInAsDemo, type HttpClient } from '../helpers/http-session';
import { tidyAfterFile } from '../helpers/lifecycle';
import {
	createLeaver,
	daysAgo,
	gateRows,
	insertGateRows,
	personRow,
	type PersonSnapshot
} from '../helpers/retention-fixtures';
import { insertTestCertificate, type TestCertificate } from '../helpers/certificate-fixtures';
import {
	acknowledge,
	makeCheck,
	makeInstructionRows,
	makeProcess,
	submittedAttempt
} from '../helpers/training-fixtures';
import { readPdf } from '../helpers/pdf-readback';
import { pool } from '../../src/lib/server/db';
import { runRetention, type RetentionRunResult } from '../../src/lib/server/records/retention';
import { placeLegalHold } from '../../src/lib/server/records/retention-holds';
import { identifierSha256 } from '../../src/lib/server/people/retired';
import { ensureCertificatePdf } from '../../src/lib/server/certificates/issue';
import { getObjectStream } from '../../src/lib/server/storage';
import { JOBS, tick } from '../../src/lib/server/jobs/scheduler';
import { localDate } from '../../src/lib/time';

const ZONE = 'Asia/Ho_Chi_Minh';
// Gate rows 4 years old are past the default 3-year period; 200 days old are not.
const OLD = () => daysAgo(4 * 365 + 20);
const RECENT = () => daysAgo(200);
const BATCH = 10;

tidyAfterFile();
let hr: HttpClient;
let admin: HttpClient;
let hrId: number;

// A: left long ago, certified, with old and recent gate rows, a session and a message.
let a: TestPerson;
let aCert: TestCertificate;
let aAttemptId: number;
let aAckId: number;
let aOldRows: number[];
let aRecentRows: number[];
// B: left long ago too, under a legal hold. C: left two years ago. D: employed.
let b: TestPerson;
let bOldRows: number[];
let c: TestPerson;
let d: TestPerson;
let unknownOldRows: number[];
let unknownRecentRows: number[];
let before: Record<string, PersonSnapshot>;

let dry: RetentionRunResult;
let real: RetentionRunResult;

async function snapshots() {
	return {
		b: await personRow(b.id),
		c: await personRow(c.id),
		d: await personRow(d.id)
	};
}

async function dispositionsOf(runId: number) {
	return queryRows<{
		record_type: string;
		entity_type: string;
		entity_id: string;
		action: string;
		detail: { count?: number; planned?: number; fromId?: number; toId?: number };
	}>(
		appDb(),
		'SELECT record_type, entity_type, entity_id, action, detail FROM retention_dispositions WHERE run_id = ? ORDER BY id',
		[runId]
	);
}

/** The page's text with runs of white space folded, so wrapped sentences can be matched. */
async function pageText(res: Response): Promise<string> {
	return (await res.text()).replace(/\s+/g, ' ');
}

async function gateCount(): Promise<number> {
	const [row] = await queryRows<{ n: number }>(appDb(), 'SELECT COUNT(*) AS n FROM gate_checks');
	return Number(row.n);
}

beforeAll(async () => {
	hr = await signInAsDemo('hr');
	admin = await signInAsDemo('admin');
	[{ id: hrId }] = await queryRows<{ id: number }>(
		appDb(),
		"SELECT id FROM people WHERE email = 'hr@kbo2.example'"
	);

	a = await createLeaver('2014-05-31', 'Retention Ánh Dương');
	aCert = await insertTestCertificate({
		personId: a.id,
		processCode: 'COG-MB',
		issuedAt: new Date('2013-03-04T02:00:00Z'),
		expiresAt: new Date('2014-03-04T17:00:00Z'),
		state: 'expired',
		withPdf: true
	});
	const proc = await makeProcess();
	const ins = await makeInstructionRows(hrId, proc.id, [
		{ letter: 'A', effectiveFrom: new Date('2012-01-01T00:00:00Z') }
	]);
	aAckId = await acknowledge(a.id, ins.revisionIds[0], new Date('2013-02-01T03:00:00Z'));
	const check = await makeCheck(proc.id, hrId);
	aAttemptId = await submittedAttempt(a.id, check, proc.id, true, new Date('2013-02-02T03:00:00Z'));
	aOldRows = await insertGateRows(a, [OLD(), OLD()]);
	aRecentRows = await insertGateRows(a, [RECENT()]);
	await appDb().query(
		`INSERT INTO auth_sessions (id, person_id, session_version, method, address, created_at, expires_at)
		 VALUES (?, ?, 1, 'badge', '10.20.30.40', ?, ?)`,
		[`retention-test-${a.id}`, a.id, daysAgo(4000), daysAgo(3999)]
	);
	await appDb().query(
		`INSERT INTO mail_outbox (dedupe_key, kind, to_address, to_person_id, about_person_id, subject,
		   text_body, html_body, created_at, send_after, sent_at)
		 VALUES (?, 'assignment', ?, ?, ?, ?, ?, ?, ?, ?, ?)`,
		[
			`retention-test:${a.id}`,
			a.email,
			a.id,
			a.id,
			`New assignment for ${a.displayName}`,
			`Hello ${a.displayName}`,
			`<p>Hello ${a.displayName}</p>`,
			daysAgo(4000),
			daysAgo(4000),
			daysAgo(4000)
		]
	);

	b = await createLeaver('2015-01-31', 'Retention Held Person');
	bOldRows = await insertGateRows(b, [OLD()]);
	await placeLegalHold(
		{ id: hrId, label: 'Sofía Herrera' },
		{ employeeNo: b.employeeNo, reason: 'Customer claim: keep the 2014 bonding records' },
		ZONE
	);
	c = await createLeaver(localDate(daysAgo(2 * 365), ZONE), 'Retention Recent Leaver');
	d = await createTestPerson({ roles: ['operator'], displayName: 'Retention Still Employed' });
	await insertGateRows(d, [OLD()]);
	unknownOldRows = await insertGateRows(
		{ id: null, badge: 'NOBODY-1' },
		Array.from({ length: 25 }, () => OLD())
	);
	unknownRecentRows = await insertGateRows({ id: null, badge: 'NOBODY-2' }, [RECENT()]);
	before = await snapshots();
});

afterAll(async () => {
	// Leave the defaults in force for whatever runs next.
	await appDb().query('DELETE FROM retention_rules');
	await pool.end();
});

describe('the dry run', () => {
	it('lists exactly the people and gate rows past retention, and changes nothing', async () => {
		const gateBefore = await gateCount();
		dry = await runRetention({ dryRun: true, actor: null, batchRows: BATCH });
		const ids = dry.summary.training.personIds;
		expect(ids).toContain(a.id);
		expect(ids).not.toContain(b.id);
		expect(ids).not.toContain(c.id);
		expect(ids).not.toContain(d.id);
		expect(dry.summary.training.heldPersonIds).toContain(b.id);
		expect(dry.plan.people.find((p) => p.id === a.id)).toMatchObject({
			employmentEndedOn: '2014-05-31',
			// Ten years (the default) after the last day of employment.
			keptUntil: '2024-05-31'
		});
		// 25 unknown-badge rows alone make three batches of at most 10.
		expect(dry.summary.gateLog.batches.length).toBeGreaterThanOrEqual(3);
		expect(dry.summary.gateLog.batches.every((x) => x.count <= BATCH)).toBe(true);
		expect(dry.summary.gateLog.rows).toBe(
			dry.summary.gateLog.batches.reduce((n, x) => n + x.count, 0)
		);
		expect(dry.summary.gateLog.heldRows).toBeGreaterThanOrEqual(1);

		expect(await gateCount()).toBe(gateBefore);
		expect((await personRow(a.id)).display_name).toBe('Retention Ánh Dương');
		expect(await dispositionsOf(dry.runId)).toEqual([]);
		const [run] = await queryRows<{ dry_run: number; finished_at: Date | null }>(
			appDb(),
			'SELECT dry_run, finished_at FROM retention_runs WHERE id = ?',
			[dry.runId]
		);
		expect(run).toMatchObject({ dry_run: 1 });
		expect(run.finished_at).not.toBeNull();
		const [audit] = await queryRows<{ action: string }>(
			appDb(),
			"SELECT action FROM audit_events WHERE entity_type = 'retention_run' AND entity_id = ?",
			[String(dry.runId)]
		);
		expect(audit.action).toBe('retention.dry_run');
	});
});

describe('the real run', () => {
	it('applies exactly the dry run: the same people, the same gate rows, the same counts', async () => {
		const gateBefore = await gateCount();
		real = await runRetention({ dryRun: false, actor: null, batchRows: BATCH });
		expect(real.summary.training.personIds).toEqual(dry.summary.training.personIds);
		expect(real.summary.training.heldPersonIds).toEqual(dry.summary.training.heldPersonIds);
		expect(real.summary.gateLog.batches).toEqual(dry.summary.gateLog.batches);
		expect(real.summary.applied).toMatchObject({
			anonymised: dry.summary.training.due,
			gateRowsDeleted: dry.summary.gateLog.rows
		});
		expect(await gateCount()).toBe(gateBefore - dry.summary.gateLog.rows);

		const disp = await dispositionsOf(real.runId);
		const people = disp.filter((x) => x.entity_type === 'person');
		expect(people.map((x) => Number(x.entity_id))).toEqual(dry.summary.training.personIds);
		expect(
			people.every((x) => x.action === 'anonymised' && x.record_type === 'training_records')
		).toBe(true);
		const batches = disp.filter((x) => x.entity_type === 'gate_checks');
		expect(batches).toHaveLength(dry.summary.gateLog.batches.length);
		for (const [i, x] of batches.entries()) {
			expect(x).toMatchObject({ record_type: 'gate_log', action: 'deleted' });
			expect(x.detail.count).toBe(dry.summary.gateLog.batches[i].count);
			expect(x.detail.planned).toBe(x.detail.count);
		}
		const [audit] = await queryRows<{ action: string }>(
			appDb(),
			"SELECT action FROM audit_events WHERE entity_type = 'retention_run' AND entity_id = ?",
			[String(real.runId)]
		);
		expect(audit.action).toBe('retention.run');
	});

	it('drops the name and identifiers and keeps the records with their numbers and dates', async () => {
		const row = await personRow(a.id);
		expect(row).toMatchObject({
			display_name: `Anonymised person #${a.id}`,
			employee_no: `ANON#${a.id}`,
			email: null,
			badge_no: null,
			locale: 'en',
			password_hash: null,
			pin_hash: null,
			employment_ended_on: '2014-05-31'
		});
		expect(row.anonymised_at).not.toBeNull();

		const [cert] = await queryRows<{
			number: string;
			issued_at: Date;
			expires_at: Date;
			state: string;
			pdf_key: string | null;
		}>(
			appDb(),
			'SELECT number, issued_at, expires_at, state, pdf_key FROM certificates WHERE id = ?',
			[aCert.id]
		);
		expect(cert).toMatchObject({
			number: aCert.number,
			issued_at: new Date('2013-03-04T02:00:00Z'),
			expires_at: new Date('2014-03-04T17:00:00Z'),
			state: 'expired',
			pdf_key: null
		});
		expect(await getObjectStream(aCert.pdfKey!)).toBeNull();
		const [attempt] = await queryRows<{ person_id: number; score_pct: number; submitted_at: Date }>(
			appDb(),
			'SELECT person_id, CAST(score_pct AS DOUBLE) AS score_pct, submitted_at FROM check_attempts WHERE id = ?',
			[aAttemptId]
		);
		expect(attempt).toMatchObject({
			person_id: a.id,
			score_pct: 100,
			submitted_at: new Date('2013-02-02T03:00:00Z')
		});
		const [ack] = await queryRows<{ person_id: number; acknowledged_at: Date }>(
			appDb(),
			'SELECT person_id, acknowledged_at FROM acknowledgements WHERE id = ?',
			[aAckId]
		);
		expect(ack).toEqual({ person_id: a.id, acknowledged_at: new Date('2013-02-01T03:00:00Z') });

		// Old gate rows gone, the recent one kept without the badge.
		expect(await gateRows(aOldRows)).toEqual([]);
		expect(await gateRows(aRecentRows)).toEqual([{ id: aRecentRows[0], badge: 'anonymised' }]);
		expect(await gateRows(unknownOldRows)).toEqual([]);
		expect(await gateRows(unknownRecentRows)).toHaveLength(1);

		const [session] = await queryRows<{ address: string | null; revoked_at: Date | null }>(
			appDb(),
			'SELECT address, revoked_at FROM auth_sessions WHERE person_id = ?',
			[a.id]
		);
		expect(session.address).toBeNull();
		expect(session.revoked_at).not.toBeNull();
		const [mail] = await queryRows<{ to_address: string; subject: string; text_body: string }>(
			appDb(),
			'SELECT to_address, subject, text_body FROM mail_outbox WHERE dedupe_key = ?',
			[`retention-test:${a.id}`]
		);
		expect(mail).toEqual({
			to_address: 'anonymised',
			subject: '(removed by retention)',
			text_body: '(removed by retention)'
		});
		const retired = await queryRows<{ kind: string }>(
			appDb(),
			'SELECT kind FROM retired_identifiers WHERE value_sha256 IN (?)',
			[[a.employeeNo, a.badge!, a.email!].map(identifierSha256)]
		);
		expect(retired.map((r) => r.kind).sort()).toEqual(['badge_no', 'email', 'employee_no']);
		const [event] = await queryRows<{ n: number }>(
			appDb(),
			"SELECT COUNT(*) AS n FROM audit_events WHERE action = 'person.anonymised' AND entity_id = ?",
			[String(a.id)]
		);
		expect(Number(event.n)).toBe(1);
	});

	it('remakes the certificate PDF with the anonymised name on the next download', async () => {
		const key = await ensureCertificatePdf(aCert.id);
		expect(key).not.toBe(aCert.pdfKey);
		const stream = await getObjectStream(key);
		const bytes = new Uint8Array(await new Response(stream!).arrayBuffer());
		const pdf = await readPdf(bytes, await mkdtemp(`${tmpdir()}/retention-`), 'anonymised');
		expect(pdf.text).toContain(`Anonymised person #${a.id}`);
		expect(pdf.text).toContain(aCert.number);
		expect(pdf.text).not.toContain('Ánh Dương');
	});

	it('leaves held, in-retention and employed people alone', async () => {
		expect(await snapshots()).toEqual(before);
		expect(await gateRows(bOldRows)).toEqual([{ id: bOldRows[0], badge: b.badge }]);
	});
});

describe('a second run', () => {
	it('changes nothing', async () => {
		const gateBefore = await gateCount();
		const aBefore = await personRow(a.id);
		const again = await runRetention({ dryRun: false, actor: null, batchRows: BATCH });
		expect(again.summary.training.personIds).toEqual([]);
		expect(again.summary.gateLog.rows).toBe(0);
		expect(again.summary.applied).toMatchObject({ anonymised: 0, gateRowsDeleted: 0 });
		expect(await dispositionsOf(again.runId)).toEqual([]);
		expect(await gateCount()).toBe(gateBefore);
		expect(await personRow(a.id)).toEqual(aBefore);
		expect(await snapshots()).toEqual(before);
	});
});

describe('legal holds', () => {
	async function holdIdOf(personId: number) {
		const [row] = await queryRows<{ id: number }>(
			appDb(),
			'SELECT id FROM legal_holds WHERE person_id = ? AND released_at IS NULL',
			[personId]
		);
		return row?.id;
	}

	it('refuses a second hold, an unknown person and an anonymised one on the field', async () => {
		const twice = await hr.postForm('/records/retention?/hold', {
			employeeNo: b.employeeNo,
			reason: 'again'
		});
		expect(twice.status).toBe(409);
		expect(await pageText(twice)).toContain('already under legal hold');
		const unknown = await hr.postForm('/records/retention?/hold', {
			employeeNo: 'NO-SUCH-PERSON',
			reason: 'audit'
		});
		expect(unknown.status).toBe(400);
		expect(await pageText(unknown)).toContain('No person has this employee number.');
		const gone = await hr.postForm('/records/retention?/hold', {
			employeeNo: `ANON#${a.id}`,
			reason: 'audit'
		});
		expect(gone.status).toBe(409);
		expect(await pageText(gone)).toContain('nothing left to hold');
		const empty = await hr.postForm('/records/retention?/hold', { employeeNo: '', reason: '' });
		expect(empty.status).toBe(400);
		const html = await pageText(empty);
		expect(html).toContain('Give the employee number.');
		expect(html).toContain('Say why the records must be kept');
	});

	it('shows the hold on the page and on the admin person page', async () => {
		const page = await hr.get('/records/retention');
		const html = await pageText(page);
		expect(html).toContain('Customer claim: keep the 2014 bonding records');
		expect(html).toContain(b.employeeNo);
		const person = await pageText(await admin.get(`/admin/people/${b.id}`));
		expect(person).toContain('Legal hold');
		expect(person).toContain('Customer claim: keep the 2014 bonding records');
	});

	it('once released, the next run disposes of the person and their gate rows', async () => {
		const holdId = await holdIdOf(b.id);
		const res = await hr.postForm('/records/retention?/release', {
			holdId,
			reason: 'claim closed'
		});
		expect(res.status).toBe(200);
		expect(await pageText(res)).toContain(`Legal hold #${holdId} released.`);
		expect(await holdIdOf(b.id)).toBeUndefined();
		const [audit] = await queryRows<{ reason: string }>(
			appDb(),
			"SELECT reason FROM audit_events WHERE action = 'legal_hold.released' AND entity_id = ?",
			[String(holdId)]
		);
		expect(audit.reason).toBe('claim closed');
		const again = await hr.postForm('/records/retention?/release', { holdId, reason: 'x again' });
		expect(again.status).toBe(409);
		expect(await pageText(again)).toContain(`Legal hold #${holdId} was already released`);

		const dryNext = await runRetention({ dryRun: true, actor: null });
		const next = await runRetention({ dryRun: false, actor: null });
		expect(dryNext.summary.training.personIds).toEqual([b.id]);
		expect(next.summary.training.personIds).toEqual([b.id]);
		expect(next.summary.applied?.gateRowsDeleted).toBe(dryNext.summary.gateLog.rows);
		expect((await personRow(b.id)).display_name).toBe(`Anonymised person #${b.id}`);
		expect(await gateRows(bOldRows)).toEqual([]);
		expect((await personRow(c.id)).display_name).toBe(before.c.display_name);
	});
});

describe('retired identifiers', () => {
	const form = (overrides: Record<string, string>) => ({
		employeeNo: `RI-${Date.now().toString(36)}`,
		displayName: 'Retired identifier test',
		email: '',
		badgeNo: `RI-${Date.now().toString(36)}`,
		locale: 'en',
		employmentType: 'employee',
		agencyName: '',
		contractEndsOn: '',
		lineId: '',
		shiftId: '',
		roles: 'operator',
		...overrides
	});

	// Case and spaces do not matter: the hash is of the trimmed, lower-cased value.
	it.each([
		['employeeNo', () => ` ${a.employeeNo.toLowerCase()}`, 'employee number belonged to a person'],
		['badgeNo', () => a.badge!.toLowerCase(), 'badge number belonged to a person'],
		['email', () => a.email!.toUpperCase(), 'e-mail address belonged to a person']
	] as const)('refuses an anonymised person’s %s on its field', async (field, value, message) => {
		const res = await admin.postForm('/admin/people/new?/save', form({ [field]: value() }));
		expect(res.status).toBe(409);
		expect(await pageText(res)).toContain(message);
	});

	it('refuses them when editing another person too', async () => {
		const other = await createTestPerson({ roles: ['operator'] });
		const res = await admin.postForm(
			`/admin/people/${other.id}?/save`,
			form({ employeeNo: other.employeeNo, badgeNo: a.badge!, email: other.email! })
		);
		expect(res.status).toBe(409);
		expect(await pageText(res)).toContain('badge number belonged to a person');
		expect((await personRow(other.id)).badge_no).toBe(other.badge);
	});

	it('refuses to rehire or edit an anonymised person, saying why', async () => {
		const res = await admin.postForm(`/admin/people/${a.id}?/reactivate`, {
			reason: 'back from abroad'
		});
		expect(res.status).toBe(409);
		expect(await pageText(res)).toContain('anonymised by the retention run');
		expect((await personRow(a.id)).active).toBe(0);
		const page = await pageText(await admin.get(`/admin/people/${a.id}`));
		expect(page).toContain('Anonymised by retention');
		expect(page).toContain('cannot be rehired');
	});
});

describe('the retention page', () => {
	it('shows the defaults as common practice and says what is not anonymised', async () => {
		const html = await pageText(await hr.get('/records/retention'));
		expect(html).toContain('common practice, with no source');
		expect(html).toContain('The audit trail.');
		expect(html).toContain('Printed names of electronic signatures');
		expect(html).toContain('An admin sets the periods.');
	});

	it('lets only admin set the rules, with field errors and an audit of old and new', async () => {
		const forbidden = await hr.postForm('/records/retention?/rules', {
			trainingRecordsYears: 12,
			gateLogYears: 3,
			reason: 'procedure QP-05'
		});
		expect(forbidden.status).toBe(403);
		const bad = await admin.postForm('/records/retention?/rules', {
			trainingRecordsYears: '51',
			gateLogYears: '0',
			reason: 'x'
		});
		expect(bad.status).toBe(400);
		const html = await pageText(bad);
		expect(html).toContain('A whole number of years from 1 to 50.');
		expect(html).toContain('A whole number of years from 1 to 30.');
		expect(html).toContain('value="51"');
		const ok = await admin.postForm('/records/retention?/rules', {
			trainingRecordsYears: '12',
			gateLogYears: '3',
			reason: 'record-control procedure QP-05 rev 3'
		});
		expect(ok.status).toBe(200);
		const events = await queryRows<{ entity_id: string; old_values: unknown; new_values: unknown }>(
			appDb(),
			"SELECT entity_id, old_values, new_values FROM audit_events WHERE action = 'retention.rule_set' AND reason = 'record-control procedure QP-05 rev 3' ORDER BY seq"
		);
		expect(events).toEqual([
			{
				entity_id: 'training_records',
				old_values: { years: 10, source: 'default' },
				new_values: { years: 12, source: 'rule' }
			},
			{
				entity_id: 'gate_log',
				old_values: { years: 3, source: 'default' },
				new_values: { years: 3, source: 'rule' }
			}
		]);
		const page = await pageText(await hr.get('/records/retention'));
		expect(page).toContain('12 years');
	});

	it('refuses a dry run and a run to roles other than hr and admin, recording nothing', async () => {
		const [{ n: runsBefore }] = await queryRows<{ n: number }>(
			appDb(),
			'SELECT COUNT(*) AS n FROM retention_runs'
		);
		for (const role of ['operator', 'quality', 'lead', 'trainer'] as const) {
			const client = await signInAsDemo(role);
			expect((await client.postForm('/records/retention?/dryRun', {})).status).toBe(403);
			expect(
				(
					await client.postForm('/records/retention?/run', {
						confirm: 'on',
						password: DEMO_PASSWORD
					})
				).status
			).toBe(403);
		}
		const [{ n: runsAfter }] = await queryRows<{ n: number }>(
			appDb(),
			'SELECT COUNT(*) AS n FROM retention_runs'
		);
		expect(runsAfter).toBe(runsBefore);
	});

	it('asks for confirmation and the password again before a real run', async () => {
		const [{ n: runsBefore }] = await queryRows<{ n: number }>(
			appDb(),
			'SELECT COUNT(*) AS n FROM retention_runs'
		);
		const unconfirmed = await hr.postForm('/records/retention?/run', { password: DEMO_PASSWORD });
		expect(unconfirmed.status).toBe(400);
		expect(await pageText(unconfirmed)).toContain('Tick the box to confirm');
		const wrong = await hr.postForm('/records/retention?/run', {
			confirm: 'on',
			password: 'not-the-password-at-all'
		});
		expect(wrong.status).toBe(400);
		expect(await pageText(wrong)).toContain('That password did not match. Nothing was changed.');
		const [{ n: runsAfter }] = await queryRows<{ n: number }>(
			appDb(),
			'SELECT COUNT(*) AS n FROM retention_runs'
		);
		expect(runsAfter).toBe(runsBefore);

		const ok = await hr.postForm('/records/retention?/run', {
			confirm: 'on',
			password: DEMO_PASSWORD
		});
		expect(ok.status).toBe(303);
		const location = ok.headers.get('location')!;
		expect(location).toMatch(/^\/records\/retention\/runs\/\d+$/);
		const page = await pageText(await hr.get(location));
		expect(page).toContain('Applied');
		expect(page).toContain('Sofía Herrera');
	});

	it('records a dry run from the page and shows its plan', async () => {
		const res = await hr.postForm('/records/retention?/dryRun', {});
		expect(res.status).toBe(303);
		const page = await pageText(await hr.get(res.headers.get('location')!));
		expect(page).toContain('Dry run: nothing changed');
		expect(page).toContain('People a run would anonymise');
		const list = await pageText(await hr.get('/records/retention'));
		expect(list).toContain('Dry run');
	});
});

describe('the daily job', () => {
	it('runs retention for real once per lease, recorded as the schedule', async () => {
		const job = JOBS.find((j) => j.name === 'retention')!;
		expect(job.intervalMs).toBe(24 * 60 * 60_000);
		const latest = async () =>
			(
				await queryRows<{ id: number; dry_run: number; actor_id: number | null }>(
					appDb(),
					'SELECT id, dry_run, actor_id FROM retention_runs ORDER BY id DESC LIMIT 1'
				)
			)[0];
		const before = await latest();
		const now = new Date();
		await tick(now, [job]);
		const run = await latest();
		expect(run.id).toBeGreaterThan(before.id);
		expect(run).toMatchObject({ dry_run: 0, actor_id: null });
		const [lease] = await queryRows<{ last_result: string }>(
			appDb(),
			"SELECT last_result FROM job_leases WHERE name = 'retention'"
		);
		expect(JSON.parse(lease.last_result)).toMatchObject({ runId: run.id, anonymised: 0 });
		// Within the day the lease is held: no second run.
		await tick(new Date(now.getTime() + 60_000), [job]);
		expect((await latest()).id).toBe(run.id);
	});
});
