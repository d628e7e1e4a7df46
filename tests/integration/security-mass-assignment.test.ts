// Mass assignment: a valid submission to each form or JSON endpoint where a person writes
// something, sent once as it is and once with fields nobody may set that way (roles, states,
// scores, ids, approvers). The answer must be the same both times, and the stored rows must carry
// only what the legitimate fields say.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { randomBytes } from 'node:crypto';
import { pool } from '../../src/lib/server/db/index';
import { createApiKey } from '../../src/lib/server/apikeys';
import { startAttempt } from '../../src/lib/server/training/checks/index';
import {
	appDb,
	closeDbHelpers,
	createTestPerson as createPlainPerson,
	queryRows,
	retireTestPeople,
	type TestPerson as PlainPerson
} from '../helpers/db';
import { signInWithPassword, type FormFields, type HttpClient } from '../helpers/http-session';
import {
	createTestPerson,
	makeInstruction,
	type TestPerson
} from '../helpers/instruction-fixtures';
import { makeCheckFixture } from '../helpers/check-fixtures';
import {
	insertCertificate,
	makeChecklist,
	makeInstructionRows,
	makeProcess,
	makeRule,
	makeStation
} from '../helpers/training-fixtures';

const ZONE = 'Asia/Ho_Chi_Minh';
const tag = () => randomBytes(4).toString('hex').toUpperCase();
const tried = new Set<string>();

/**
 * Extra fields a tamperer adds, with `other` (someone else's id) and `admin` as values; `names`
 * adds more, and `-name` leaves one out where it is a legitimate field of the form.
 */
function extras(other: number, names: string[] = []): Record<string, string> {
	const all: Record<string, string> = {
		role: 'admin',
		roles: 'admin',
		'roles[]': 'admin',
		status: 'approved',
		state: 'approved',
		passed: 'true',
		score_pct: '100',
		scorePct: '100',
		active: '0',
		id: String(other),
		personId: String(other),
		person_id: String(other),
		approvedBy: String(other),
		approved_by: String(other),
		authorId: String(other),
		grantedBy: String(other),
		placedBy: String(other),
		sessionVersion: '999',
		passwordHash: 'x',
		isAdmin: 'true',
		__proto__: 'x',
		'constructor[prototype][isAdmin]': 'true'
	};
	for (const n of names) if (!n.startsWith('-')) all[n] ??= String(other);
	for (const k of Object.keys(all)) tried.add(k);
	return Object.fromEntries(Object.entries(all).filter(([k]) => !names.includes(`-${k}`)));
}

/** JSON extras: the same names with typed values. */
function jsonExtras(other: number): Record<string, unknown> {
	const e: Record<string, unknown> = {
		role: 'admin',
		roles: ['admin'],
		status: 'approved',
		state: 'approved',
		passed: true,
		score_pct: 100,
		scorePct: 100,
		active: false,
		id: other,
		personId: other,
		approvedBy: other,
		authorId: other,
		decision: 'allow',
		source: 'kiosk',
		isAdmin: true
	};
	for (const k of Object.keys(e)) tried.add(k);
	return e;
}

let admin: HttpClient;
let hr: HttpClient;
let trainer: HttpClient;
let operator: HttpClient;
let lead: HttpClient;
let people: { trainer: TestPerson; quality: TestPerson; operator: TestPerson; hr: TestPerson };
let bystander: PlainPerson;
let leadP: PlainPerson;

beforeAll(async () => {
	const adminP = await createTestPerson(['admin']);
	people = {
		trainer: await createTestPerson(['trainer']),
		quality: await createTestPerson(['quality']),
		operator: await createTestPerson(['operator']),
		hr: await createTestPerson(['hr'])
	};
	leadP = await createPlainPerson({ roles: ['lead'], line: 'L1' });
	bystander = await createPlainPerson({ roles: ['operator'], line: 'L1' });
	admin = await signInWithPassword(adminP.email, adminP.password);
	hr = await signInWithPassword(people.hr.email, people.hr.password);
	trainer = await signInWithPassword(people.trainer.email, people.trainer.password);
	operator = await signInWithPassword(people.operator.email, people.operator.password);
	lead = await signInWithPassword(leadP.email!, leadP.password);
});

afterAll(async () => {
	console.info(`mass assignment: ${tried.size} distinct extra field names tried`);
	await retireTestPeople();
	await closeDbHelpers();
	await pool.end();
});

async function snapshot(sql: string, params: unknown[]) {
	return queryRows(appDb(), sql, params);
}

describe('admin people save', () => {
	it('extras change neither the state, the roles, the secrets nor another person', async () => {
		const target = await createPlainPerson({ roles: ['operator'] });
		const fields: FormFields = {
			employeeNo: target.employeeNo,
			displayName: `Renamed ${tag()}`,
			email: '',
			badgeNo: target.badge!,
			locale: 'vi',
			employmentType: 'employee',
			roles: ['operator']
		};
		const path = `/admin/people/${target.id}?/save`;
		const plain = await admin.postForm(path, fields);
		await plain.body?.cancel();
		const personRow = (id: number) =>
			snapshot(
				`SELECT id, display_name, active, password_hash, pin_hash, session_version, anonymised_at,
				   employment_ended_on FROM people WHERE id = ?`,
				[id]
			);
		const before = await personRow(target.id);
		const bystanderBefore = await personRow(bystander.id);
		const tampered = await admin.postForm(path, {
			...fields,
			...extras(bystander.id, ['-roles', 'anonymisedAt', 'employmentEndedOn'])
		});
		await tampered.body?.cancel();
		expect(tampered.status).toBe(plain.status);
		expect(plain.status).toBe(200);
		expect(await personRow(target.id)).toEqual(before);
		expect(await personRow(bystander.id)).toEqual(bystanderBefore);
		const roles = await snapshot(
			'SELECT role FROM role_assignments WHERE person_id = ? AND revoked_at IS NULL',
			[target.id]
		).catch(() => snapshot('SELECT role FROM role_assignments WHERE person_id = ?', [target.id]));
		expect(roles.map((r) => r.role)).toEqual(['operator']);
	});

	it('a new person gets only the roles and state the form says', async () => {
		const t = tag();
		const fields: FormFields = {
			employeeNo: `MA-${t}`,
			displayName: `Mass ${t}`,
			email: '',
			badgeNo: `MA-${t}`,
			locale: 'en',
			employmentType: 'employee',
			roles: ['operator'],
			...extras(bystander.id, ['-roles'])
		};
		const res = await admin.postForm('/admin/people/new?/save', fields);
		await res.body?.cancel();
		expect(res.status).toBe(303);
		const [row] = await snapshot(
			'SELECT id, active, password_hash, session_version FROM people WHERE employee_no = ?',
			[`MA-${t}`]
		);
		expect(row.id).not.toBe(bystander.id);
		expect(row.active).toBe(1);
		expect(row.password_hash).toBeNull();
		const roles = await snapshot('SELECT role FROM role_assignments WHERE person_id = ?', [row.id]);
		expect(roles.map((r) => r.role)).toEqual(['operator']);
	});
});

describe('instruction draft save', () => {
	let doc: string;
	let revisionId: number;
	const revisionRow = () =>
		snapshot(
			`SELECT id, instruction_id, letter, state, author_id, approved_by, approved_at, effective_from,
			   classification FROM revisions WHERE id = ?`,
			[revisionId]
		);
	const version = async () =>
		(await snapshot('SELECT version FROM revisions WHERE id = ?', [revisionId]))[0]
			.version as number;

	beforeAll(async () => {
		const made = await makeInstruction(people.trainer, people.quality, [
			{ source: '# Draft', stop: 'draft' }
		]);
		doc = made.docNumber;
		revisionId = made.revisionIds[0];
	});

	it('the form saves the text only: state, author and approval stay as they were', async () => {
		const before = await revisionRow();
		const path = `/instructions/${doc}/revisions/A/edit?/save`;
		const plain = await trainer.postForm(path, { source: '# One', version: await version() });
		await plain.body?.cancel();
		const tampered = await trainer.postForm(path, {
			source: '# Two',
			version: await version(),
			...extras(people.quality.id, ['effectiveFrom', 'effective_from', 'letter', 'classification'])
		});
		await tampered.body?.cancel();
		expect(plain.status).toBe(200);
		expect(tampered.status).toBe(plain.status);
		expect(await revisionRow()).toEqual(before);
		const [{ source }] = await snapshot('SELECT source FROM revisions WHERE id = ?', [revisionId]);
		expect(source).toBe('# Two');
	});

	it('the autosave API does the same with JSON extras', async () => {
		const before = await revisionRow();
		const path = `/api/v1/instructions/${doc}/revisions/A/draft`;
		const headers = { 'content-type': 'application/json', accept: 'application/json' };
		const plain = await trainer.post(
			path,
			JSON.stringify({ source: '# Three', version: await version() }),
			{ headers }
		);
		await plain.body?.cancel();
		const tampered = await trainer.post(
			path,
			JSON.stringify({
				source: '# Four',
				version: await version(),
				...jsonExtras(people.quality.id),
				effectiveFrom: '2026-01-01'
			}),
			{ headers }
		);
		await tampered.body?.cancel();
		expect(plain.status).toBe(200);
		expect(tampered.status).toBe(plain.status);
		expect(await revisionRow()).toEqual(before);
	});
});

describe('knowledge check attempt submit', () => {
	let fx: Awaited<ReturnType<typeof makeCheckFixture>>;
	beforeAll(async () => {
		fx = await makeCheckFixture(people.trainer, people.quality);
	});
	const attemptRow = (id: number) =>
		snapshot(
			'SELECT person_id, state, CAST(score_pct AS DOUBLE) AS score_pct, passed, pass_mark_pct, check_version_id FROM check_attempts WHERE id = ?',
			[id]
		);

	it('a form submit with passed/score/person extras is graded on the answers alone', async () => {
		const { id } = await startAttempt(people.operator.actor, fx.processId);
		const res = await operator.postForm(`/training/attempts/${id}?/submit`, {
			...extras(bystander.id, ['passMarkPct', 'pass_mark_pct', 'submittedAt'])
		});
		await res.body?.cancel();
		// The same answer as a submission with no answers at all: graded, and redirected.
		expect(res.status).toBe(303);
		const [row] = await attemptRow(id);
		expect(row).toMatchObject({
			person_id: people.operator.id,
			state: 'submitted',
			score_pct: 0,
			passed: 0,
			pass_mark_pct: 80
		});
		const bystanderAttempts = await snapshot('SELECT id FROM check_attempts WHERE person_id = ?', [
			bystander.id
		]);
		expect(bystanderAttempts).toEqual([]);
	});

	it('the JSON submit ignores passed, scorePct and personId beside the answers', async () => {
		await appDb()
			.query(
				"UPDATE check_attempts SET started_at = started_at - INTERVAL 2 DAY WHERE person_id = ? AND state = 'submitted'",
				[people.operator.id]
			)
			.catch(() => undefined);
		const other = await createTestPerson(['operator']);
		const client = await signInWithPassword(other.email, other.password);
		const { id } = await startAttempt(other.actor, fx.processId);
		const res = await client.post(
			`/api/v1/attempts/${id}/submit`,
			JSON.stringify({ answers: {}, ...jsonExtras(bystander.id), passMarkPct: 0 }),
			{ headers: { 'content-type': 'application/json', accept: 'application/json' } }
		);
		const body = (await res.json()) as { passed: boolean; scorePct: number };
		expect(res.status).toBe(200);
		expect(body).toMatchObject({ passed: false, scorePct: 0 });
		const [row] = await attemptRow(id);
		expect(row).toMatchObject({ person_id: other.id, passed: 0, score_pct: 0, pass_mark_pct: 80 });
		// No certificate came of it.
		expect(await snapshot('SELECT id FROM certificates WHERE person_id = ?', [other.id])).toEqual(
			[]
		);
	});
});

describe('practical sign-off steps', () => {
	it('marking a step with extras stores the step result only; the sign-off stays in progress', async () => {
		const proc = await makeProcess();
		const rows = await makeInstructionRows(people.trainer.id, proc.id, [
			{ letter: 'A', effectiveFrom: new Date(Date.now() - 86_400_000) }
		]);
		const checklist = await makeChecklist(proc.id, rows.revisionIds[0], people.trainer.id);
		// Only a trainer qualified on the process may observe it.
		const ruleId = await makeRule({
			processId: proc.id,
			createdBy: people.quality.id,
			instructionIds: []
		});
		await insertCertificate(people.trainer.id, proc.id, ruleId);
		const start = await trainer.postForm('/signoffs/new?/start', {
			personId: people.operator.id,
			checklistId: checklist,
			stationId: '',
			...extras(bystander.id, ['-personId', 'trainerId', 'state'])
		});
		await start.body?.cancel();
		expect(start.status).toBe(303);
		const signoffId = Number(/signoffs\/(\d+)/.exec(start.headers.get('location') ?? '')?.[1]);
		const [item] = await snapshot('SELECT id FROM checklist_items WHERE checklist_id = ?', [
			checklist
		]);
		const signoffRow = () =>
			snapshot(
				'SELECT person_id, trainer_id, state, passed, trainer_signed_at, operator_signed_at FROM signoffs WHERE id = ?',
				[signoffId]
			);
		const before = await signoffRow();
		const plain = await trainer.postForm(`/signoffs/${signoffId}?/item`, {
			itemId: item.id,
			result: 'fail'
		});
		await plain.body?.cancel();
		const tampered = await trainer.postForm(`/signoffs/${signoffId}?/item`, {
			itemId: item.id,
			result: 'fail',
			...extras(bystander.id, ['trainerId', 'trainer_id', 'countersigned'])
		});
		await tampered.body?.cancel();
		expect(tampered.status).toBe(plain.status);
		expect(plain.status).toBeLessThan(400);
		expect(await signoffRow()).toEqual(before);
		expect(before[0]).toMatchObject({
			person_id: people.operator.id,
			trainer_id: people.trainer.id
		});
		const items = await snapshot('SELECT * FROM signoff_items WHERE signoff_id = ?', [signoffId]);
		expect(items).toHaveLength(1);
		expect(JSON.stringify(items[0])).toMatch(/fail|"passed":0|"result":"fail"/);
		// The trainer's signature with extras: signed by the trainer, never countersigned by it.
		const sign = await trainer.postForm(`/signoffs/${signoffId}?/sign`, {
			password: people.trainer.password,
			...extras(bystander.id, ['operatorSignedAt', 'operator_signed_at', 'countersign'])
		});
		await sign.body?.cancel();
		expect(sign.status).toBeLessThan(400);
		const [signed] = await signoffRow();
		expect(signed.state).not.toBe('countersigned');
		expect(signed.operator_signed_at).toBeNull();
		expect(signed.person_id).toBe(people.operator.id);
		expect(signed.trainer_id).toBe(people.trainer.id);
	});
});

describe('supervised run grant', () => {
	it("the run is granted by the lead, for the form's person, station and end time only", async () => {
		const proc = await makeProcess();
		const ruleId = await makeRule({ processId: proc.id, createdBy: leadP.id, instructionIds: [] });
		const station = await makeStation([proc.id]);
		const supervisor = await createPlainPerson({ roles: ['operator'], line: 'L1' });
		const runner = await createPlainPerson({ roles: ['operator'], line: 'L1', withEmail: false });
		await insertCertificate(supervisor.id, proc.id, ruleId, {
			expiresAt: new Date(Date.now() + 200 * 86_400_000)
		});
		const hm = new Intl.DateTimeFormat('en-GB', {
			timeZone: ZONE,
			hour: '2-digit',
			minute: '2-digit',
			hourCycle: 'h23'
		}).format(new Date(Date.now() + 60 * 60_000));
		const until = hm < '00:30' ? '23:59' : hm;
		const res = await lead.postForm('/supervised-runs?/grant', {
			personId: runner.id,
			stationId: station.id,
			supervisorId: supervisor.id,
			until,
			reason: 'Mass assignment sweep run',
			...extras(bystander.id, [
				'endsAt',
				'ends_at',
				'startsAt',
				'revokedAt',
				'supervisor',
				'-personId',
				'-id'
			])
		});
		const html = await res.text();
		expect(res.status, html.slice(0, 300)).toBe(200);
		const runs = await snapshot(
			"SELECT person_id, station_id, supervisor_id, granted_by, revoked_at, DATE_FORMAT(CONVERT_TZ(ends_at, '+00:00', '+07:00'), '%H:%i') AS ends FROM supervised_runs WHERE station_id = ?",
			[station.id]
		);
		expect(runs).toHaveLength(1);
		expect(runs[0]).toMatchObject({
			person_id: runner.id,
			supervisor_id: supervisor.id,
			granted_by: leadP.id,
			revoked_at: null
		});
		if (until !== '23:59') expect(runs[0].ends).toBe(until);
		expect(
			await snapshot('SELECT id FROM supervised_runs WHERE person_id = ?', [bystander.id])
		).toEqual([]);
	});
});

describe('retention forms', () => {
	it('a legal hold lands on the employee number given, placed by the signed-in person, open', async () => {
		const held = await createPlainPerson({ roles: ['operator'] });
		const res = await hr.postForm('/records/retention?/hold', {
			employeeNo: held.employeeNo,
			reason: 'Customer audit of line L1',
			...extras(bystander.id, ['releasedAt', 'released_at', 'releasedBy', '-personId'])
		});
		await res.body?.cancel();
		expect(res.status).toBe(200);
		const holds = await snapshot(
			'SELECT person_id, placed_by, released_at, released_by FROM legal_holds WHERE person_id IN (?, ?)',
			[held.id, bystander.id]
		);
		expect(holds).toEqual([
			{ person_id: held.id, placed_by: people.hr.id, released_at: null, released_by: null }
		]);
	});

	it('the rules form changes the two periods only', async () => {
		const before = await snapshot(
			'SELECT record_type FROM retention_rules ORDER BY record_type',
			[]
		);
		const res = await admin.postForm('/records/retention?/rules', {
			trainingRecordsYears: '10',
			gateLogYears: '3',
			reason: 'Mass assignment sweep',
			...extras(bystander.id, ['recordType', 'record_type', 'updatedBy'])
		});
		await res.body?.cancel();
		expect(res.status).toBe(200);
		const after = await snapshot(
			'SELECT record_type, updated_by FROM retention_rules ORDER BY record_type',
			[]
		).catch(() => snapshot('SELECT record_type FROM retention_rules ORDER BY record_type', []));
		// No other record type appeared, and none went away.
		const types = after.map((r) => r.record_type as string);
		expect(types.every((t) => ['gate_log', 'training_records'].includes(t))).toBe(true);
		for (const b of before) expect(types).toContain(b.record_type);
		for (const r of after) if ('updated_by' in r) expect(r.updated_by).not.toBe(bystander.id);
	});
});

describe('API v1 POST endpoints', () => {
	it('the gate decides on station and badge alone: decision, person and source in the body are ignored', async () => {
		const proc = await makeProcess();
		const station = await makeStation([proc.id]);
		const actor = { id: leadP.id, label: 'mass assignment' };
		const { key } = await createApiKey(actor, {
			name: 'mass',
			scope: 'gate',
			stationId: station.id
		});
		const headers = {
			'content-type': 'application/json',
			accept: 'application/json',
			authorization: `Bearer ${key}`
		};
		const body = { station: station.code, badge: bystander.badge };
		const plainRes = await fetch(new URL('/api/v1/gate/checks', process.env.TEST_APP_URL), {
			method: 'POST',
			headers,
			body: JSON.stringify(body)
		});
		const plain = (await plainRes.json()) as { decision: string; checkId: number };
		const tamperedRes = await fetch(new URL('/api/v1/gate/checks', process.env.TEST_APP_URL), {
			method: 'POST',
			headers,
			body: JSON.stringify({
				...body,
				...jsonExtras(people.operator.id),
				validUntil: '2099-01-01T00:00:00Z',
				reasons: []
			})
		});
		const tampered = (await tamperedRes.json()) as { decision: string; checkId: number };
		expect(tamperedRes.status).toBe(plainRes.status);
		expect(plain.decision).toBe('deny');
		expect(tampered.decision).toBe('deny');
		const logged = await snapshot(
			'SELECT person_id, decision, source FROM gate_checks WHERE id = ?',
			[tampered.checkId]
		);
		expect(logged).toEqual([{ person_id: bystander.id, decision: 'deny', source: 'api' }]);
	});

	it('the calculators give the same outputs with or without extra fields', async () => {
		const inputs = { basis: 'tool', lengthMm: 30, widthMm: 2, pressureMPa: 3 };
		const headers = { 'content-type': 'application/json', accept: 'application/json' };
		const plain = await operator.post('/api/v1/calculators/bond-force', JSON.stringify(inputs), {
			headers
		});
		const tampered = await operator.post(
			'/api/v1/calculators/bond-force',
			JSON.stringify({ ...inputs, ...jsonExtras(1), outputs: { forceN: 1 } }),
			{ headers }
		);
		expect(tampered.status).toBe(plain.status);
		expect(await tampered.json()).toEqual(await plain.json());
	});
});
