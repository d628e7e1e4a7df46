// Malformed and hostile input against a representative set of forms and JSON endpoints: every
// answer is a 4xx with the field named (superforms field errors on pages, `{ error, fields }` in the
// API), never a 500 or a stack trace; valid but unusual text (Vietnamese, Chinese, RTL, emoji) is
// stored byte for byte. Payloads: tests/helpers/hostile-payloads.ts.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { randomBytes } from 'node:crypto';
import { pool } from '../../src/lib/server/db/index';
import { createApiKey } from '../../src/lib/server/apikeys';
import { startAttempt } from '../../src/lib/server/training/checks/index';
import { appDb, closeDbHelpers, queryRows } from '../helpers/db';
import { newClient, signInWithPassword, type HttpClient } from '../helpers/http-session';
import {
	createTestPerson,
	makeInstruction,
	type TestPerson
} from '../helpers/instruction-fixtures';
import { makeCheckFixture } from '../helpers/check-fixtures';
import { makeInstructionRows, makeProcess, makeStation } from '../helpers/training-fixtures';
import {
	BAD_JSON_BODIES,
	HOSTILE_NUMBERS,
	HOSTILE_TEXT,
	IMPOSSIBLE_DATES,
	INVALID_UTF8,
	UNUSUAL_TEXT,
	WRONG_JSON_TYPES,
	jsonWithRawBytes,
	urlencodedWithEscapedBytes,
	urlencodedWithRawBytes
} from '../helpers/hostile-payloads';

/** What a string becomes on the wire as UTF-8 (a lone surrogate turns into U+FFFD in the client). */
const sent = (v: string) => Buffer.from(v, 'utf8').toString('utf8');
const STACK = /node_modules|\.(?:js|ts):\d+:\d+|\n\s+at [\w.<>]+ \(/;
const tag = () => randomBytes(4).toString('hex').toUpperCase();
/** Payloads × endpoints actually sent, printed at the end. */
const tried = new Map<string, number>();
const count = (endpoint: string) => tried.set(endpoint, (tried.get(endpoint) ?? 0) + 1);

let admin: HttpClient;
let hr: HttpClient;
let author: HttpClient;
let operator: HttpClient;
let trainerP: TestPerson;
let operatorP: TestPerson;
let draft: { docNumber: string; revisionId: number };
let gateKey: string;
let station: { id: number; code: string };
let attemptId: number;

beforeAll(async () => {
	const adminP = await createTestPerson(['admin']);
	const hrP = await createTestPerson(['hr']);
	trainerP = await createTestPerson(['trainer']);
	const qualityP = await createTestPerson(['quality']);
	operatorP = await createTestPerson(['operator']);
	admin = await signInWithPassword(adminP.email, adminP.password);
	hr = await signInWithPassword(hrP.email, hrP.password);
	author = await signInWithPassword(trainerP.email, trainerP.password);
	operator = await signInWithPassword(operatorP.email, operatorP.password);
	const made = await makeInstruction(trainerP, qualityP, [{ source: '# Draft', stop: 'draft' }]);
	draft = { docNumber: made.docNumber, revisionId: made.revisionIds[0] };
	const proc = await makeProcess();
	station = await makeStation([proc.id]);
	gateKey = (
		await createApiKey(adminP.actor, { name: 'malformed', scope: 'gate', stationId: station.id })
	).key;
	const fx = await makeCheckFixture(trainerP, qualityP);
	attemptId = (await startAttempt(operatorP.actor, fx.processId)).id;
});

afterAll(async () => {
	const lines = [...tried].map(([k, n]) => `  ${String(n).padStart(4)}  ${k}`);
	const total = [...tried.values()].reduce((a, b) => a + b, 0);
	console.info(
		`malformed-input sweep: ${total} requests (payloads × endpoints) over ${tried.size} endpoints\n${lines.join('\n')}`
	);
	await closeDbHelpers();
	await pool.end();
});

/** Never a 5xx, never a stack trace, whatever came in. */
async function bodyOf(res: Response): Promise<string> {
	const text = await res.text();
	expect(res.status, text.slice(0, 300)).toBeLessThan(500);
	expect(text).not.toMatch(STACK);
	return text;
}

/** A refused form post: 4xx and the field's error shown on the page (role="alert" beside it). */
async function expectFormRefused(res: Response, field: string) {
	const html = await bodyOf(res);
	expect(res.status, `${field}: ${html.slice(0, 200)}`).toBeGreaterThanOrEqual(400);
	expect(res.status).toBeLessThan(500);
	return html;
}

/** A refused JSON call: a 4xx with `{ error }`, and `fields` whenever the status says "bad input". */
async function expectApiRefused(res: Response, statuses = [400, 413, 415, 422]) {
	const text = await bodyOf(res);
	expect(statuses, `${res.status} ${text.slice(0, 300)}`).toContain(res.status);
	expect(res.headers.get('content-type')).toMatch(/application\/json/);
	const body = JSON.parse(text) as { error?: unknown; fields?: unknown };
	expect(typeof body.error).toBe('string');
	if (res.status === 400 || res.status === 422) expect(typeof body.fields).toBe('object');
	return body as { error: string; fields?: Record<string, string> };
}

const FORM = { 'content-type': 'application/x-www-form-urlencoded', accept: 'text/html' };
const JSON_HEADERS = { 'content-type': 'application/json', accept: 'application/json' };

describe('sign-in', () => {
	it('refuses every hostile e-mail and badge with a field error and no sign-in attempt', async () => {
		for (const p of HOSTILE_TEXT) {
			count('POST /signin?/password');
			const res = await newClient().postForm('/signin?/password', {
				email: p.value,
				password: '',
				redirectTo: '/'
			});
			const html = await expectFormRefused(res, 'email');
			expect(res.status).toBe(400);
			expect(html).toContain('role="alert"');
			count('POST /signin?/badge');
			const badge = await newClient().postForm('/signin?/badge', {
				badge: p.value,
				pin: 'x',
				redirectTo: '/'
			});
			expect((await expectFormRefused(badge, 'badge')).length).toBeGreaterThan(0);
			expect(badge.status).toBe(400);
		}
	});

	it('refuses bodies that are not UTF-8, raw and percent-encoded, with 400', async () => {
		for (const bad of INVALID_UTF8) {
			const fields = { email: 'x@example.com', password: 'not-the-password', redirectTo: '/' };
			for (const body of [
				urlencodedWithRawBytes(fields, 'password', bad.bytes),
				urlencodedWithEscapedBytes(fields, 'password', bad.bytes)
			]) {
				count('POST /signin?/password (invalid UTF-8)');
				const res = await newClient().post('/signin?/password', body as BodyInit, {
					headers: FORM
				});
				const text = await bodyOf(res);
				expect(res.status, text.slice(0, 200)).toBe(400);
				expect(text).toContain('password');
			}
		}
	});
});

describe('admin people', () => {
	const base = () => {
		const t = tag();
		return {
			employeeNo: `MF-${t}`,
			displayName: `Malformed ${t}`,
			email: '',
			badgeNo: `MF-${t}`,
			locale: 'en',
			employmentType: 'employee',
			roles: 'operator'
		};
	};
	const stored = async (employeeNo: string) =>
		queryRows<{ display_name: string; contract_ends_on: string | null }>(
			appDb(),
			"SELECT display_name, DATE_FORMAT(contract_ends_on, '%Y-%m-%d') AS contract_ends_on FROM people WHERE employee_no = ?",
			[employeeNo]
		);

	it('a hostile name is refused (or, when it is real text, kept exactly); nothing else is stored', async () => {
		for (const p of HOSTILE_TEXT) {
			const fields = { ...base(), displayName: p.value };
			count('POST /admin/people/new?/save displayName');
			const res = await admin.postForm('/admin/people/new?/save', fields);
			const html = await bodyOf(res);
			const rows = await stored(fields.employeeNo);
			if (res.status === 303) {
				// Accepted: the name must be exactly what was sent (it is text, not a control).
				expect(rows, p.name).toHaveLength(1);
				expect(rows[0].display_name, p.name).toBe(sent(p.value));
				expect(p.value.includes('\u0000') || p.value.includes('\u202E')).toBe(false);
				expect(p.value.length).toBeLessThanOrEqual(200);
			} else {
				expect(res.status, p.name).toBe(400);
				expect(html, p.name).toMatch(/id="displayName-error"|role="alert"/);
				expect(rows, p.name).toHaveLength(0);
			}
			// These must never get in.
			// (A lone surrogate cannot reach a form: the client sends U+FFFD, which is text.)
			if (/1 MB|NUL|RTL/.test(p.name)) expect(res.status, p.name).toBe(400);
		}
	});

	it('an impossible contract end date is refused on its field', async () => {
		for (const d of IMPOSSIBLE_DATES) {
			const fields = {
				...base(),
				employmentType: 'agency',
				agencyName: 'Test Staffing',
				contractEndsOn: d
			};
			count('POST /admin/people/new?/save contractEndsOn');
			const res = await admin.postForm('/admin/people/new?/save', fields);
			const html = await expectFormRefused(res, 'contractEndsOn');
			expect(res.status, d).toBe(400);
			expect(html, d).toContain('Use a real date');
			expect(await stored(fields.employeeNo), d).toHaveLength(0);
		}
	});

	it('a name that is not UTF-8 is refused and nothing is stored', async () => {
		for (const bad of INVALID_UTF8) {
			const fields = base();
			count('POST /admin/people/new?/save (invalid UTF-8)');
			const res = await admin.post(
				'/admin/people/new?/save',
				urlencodedWithRawBytes(fields, 'displayName', bad.bytes) as BodyInit,
				{ headers: FORM }
			);
			const text = await bodyOf(res);
			expect(res.status, `${bad.name}: ${text.slice(0, 200)}`).toBe(400);
			expect(text).toContain('displayName');
			expect(await stored(fields.employeeNo)).toHaveLength(0);
		}
	});

	it('Vietnamese, Chinese, Korean, RTL and emoji names are stored byte for byte', async () => {
		for (const p of UNUSUAL_TEXT) {
			const fields = { ...base(), displayName: p.value };
			count('POST /admin/people/new?/save (unusual text)');
			const res = await admin.postForm('/admin/people/new?/save', fields);
			await bodyOf(res);
			expect(res.status, p.name).toBe(303);
			const rows = await queryRows<{ hex: string }>(
				appDb(),
				'SELECT HEX(display_name) AS hex FROM people WHERE employee_no = ?',
				[fields.employeeNo]
			);
			expect(rows[0]?.hex, p.name).toBe(Buffer.from(p.value, 'utf8').toString('hex').toUpperCase());
		}
	});
});

describe('instruction draft', () => {
	const version = async () =>
		(
			await queryRows<{ version: number; source: string }>(
				appDb(),
				'SELECT version, source FROM revisions WHERE id = ?',
				[draft.revisionId]
			)
		)[0];
	const formPath = () => `/instructions/${draft.docNumber}/revisions/A/edit?/save`;
	const apiPath = () => `/api/v1/instructions/${draft.docNumber}/revisions/A/draft`;

	it('the form refuses a 1 MB text, NUL and broken characters, and keeps real text exactly', async () => {
		for (const p of [...HOSTILE_TEXT, ...UNUSUAL_TEXT]) {
			const before = await version();
			count('POST instruction edit?/save source');
			const res = await author.postForm(formPath(), { source: p.value, version: before.version });
			const html = await bodyOf(res);
			const after = await version();
			if (res.status === 200) {
				expect(after.source, p.name).toBe(sent(p.value));
				expect(after.version).toBe(before.version + 1);
			} else {
				expect(res.status, p.name).toBe(400);
				expect(html, p.name).toContain('role="note"');
				expect(after).toEqual(before);
			}
			if (/1 MB|NUL/.test(p.name)) expect(res.status, p.name).toBe(400);
			if (UNUSUAL_TEXT.includes(p)) expect(res.status, p.name).toBe(200);
		}
	});

	it('the autosave API answers bad bodies with { error, fields } and the right status', async () => {
		for (const b of BAD_JSON_BODIES) {
			count('POST draft API (bad body)');
			const res = await author.post(apiPath(), b.body, {
				headers: { 'content-type': b.type, accept: 'application/json' }
			});
			const body = await expectApiRefused(res);
			if (b.type !== 'application/json') expect(res.status, b.name).toBe(415);
			else expect(res.status, b.name).toBe(400);
			expect(body.error.length).toBeGreaterThan(0);
		}
		for (const w of WRONG_JSON_TYPES) {
			for (const field of ['source', 'version']) {
				const v = await version();
				count('POST draft API (wrong type)');
				const res = await author.post(
					apiPath(),
					JSON.stringify({ source: 'ok', version: v.version, [field]: w.value }),
					{ headers: JSON_HEADERS }
				);
				if (res.status === 200) {
					// Only -0 as a version could pass as a number; the version check then refuses it.
					throw new Error(`${field} = ${w.name} was accepted`);
				}
				const body = await expectApiRefused(res, [400, 409]);
				if (res.status === 400) expect(Object.keys(body.fields ?? {}), w.name).toContain(field);
			}
		}
	});

	it('the autosave API refuses a body over its limit with 413, NUL and lone surrogates with 400', async () => {
		const v = await version();
		count('POST draft API (5 MB)');
		const big = await author.post(
			apiPath(),
			JSON.stringify({ source: 'x'.repeat(5 * 1024 * 1024), version: v.version }),
			{ headers: JSON_HEADERS }
		);
		await expectApiRefused(big, [413]);
		for (const source of ['a\u0000b', 'x\uD800y', '\uDFFF']) {
			count('POST draft API (NUL / lone surrogate)');
			const res = await author.post(apiPath(), JSON.stringify({ source, version: v.version }), {
				headers: JSON_HEADERS
			});
			const body = await expectApiRefused(res, [400]);
			expect(Object.keys(body.fields ?? {})).toContain('source');
		}
		expect(await version()).toEqual(v);
	});

	it('the autosave API refuses JSON that is not UTF-8 and stores nothing', async () => {
		for (const bad of INVALID_UTF8) {
			const v = await version();
			count('POST draft API (invalid UTF-8)');
			const res = await author.post(
				apiPath(),
				jsonWithRawBytes({ source: 'x@@BYTES@@y', version: v.version }, bad.bytes) as BodyInit,
				{ headers: JSON_HEADERS }
			);
			await expectApiRefused(res, [400]);
			expect(await version(), bad.name).toEqual(v);
		}
	});

	it('the autosave API stores unusual text byte for byte', async () => {
		for (const p of UNUSUAL_TEXT) {
			const v = await version();
			count('POST draft API (unusual text)');
			const res = await author.post(
				apiPath(),
				JSON.stringify({ source: `${p.value}\n`, version: v.version }),
				{ headers: JSON_HEADERS }
			);
			expect(res.status, await res.clone().text()).toBe(200);
			await bodyOf(res);
			const [row] = await queryRows<{ hex: string }>(
				appDb(),
				'SELECT HEX(source) AS hex FROM revisions WHERE id = ?',
				[draft.revisionId]
			);
			expect(row.hex).toBe(Buffer.from(`${p.value}\n`, 'utf8').toString('hex').toUpperCase());
		}
	});

	it('the preview API answers bad bodies with { error, fields }', async () => {
		for (const b of BAD_JSON_BODIES) {
			count('POST preview API (bad body)');
			const res = await author.post('/api/v1/instructions/preview', b.body, {
				headers: { 'content-type': b.type, accept: 'application/json' }
			});
			await expectApiRefused(res);
			if (b.type !== 'application/json') expect(res.status, b.name).toBe(415);
		}
	});
});

describe('calculators API', () => {
	const good = {
		basis: 'bump',
		bumpCount: 1000,
		bumpWidthUm: 18,
		bumpLengthUm: 90,
		pressureMPa: 78.4532,
		cylinderBoreMm: 40,
		headWeightN: 20
	};
	const path = '/api/v1/calculators/bond-force';

	it('refuses bad bodies, wrong types and hostile numbers on the field', async () => {
		for (const b of BAD_JSON_BODIES) {
			count('POST calculators API (bad body)');
			const res = await operator.post(path, b.body, {
				headers: { 'content-type': b.type, accept: 'application/json' }
			});
			await expectApiRefused(res);
		}
		for (const v of [...WRONG_JSON_TYPES.map((w) => w.value), ...HOSTILE_NUMBERS]) {
			count('POST calculators API (bumpWidthUm)');
			const res = await operator.post(path, JSON.stringify({ ...good, bumpWidthUm: v }), {
				headers: JSON_HEADERS
			});
			if (res.status === 200) {
				// Only a real number can pass, and then the result is a number, never NaN.
				const body = (await res.json()) as { outputs: Record<string, number> };
				expect(Object.values(body.outputs).every((x) => Number.isFinite(x))).toBe(true);
				continue;
			}
			const body = await expectApiRefused(res);
			expect(Object.keys(body.fields ?? {}), String(v)).toContain('bumpWidthUm');
		}
		for (const p of HOSTILE_TEXT) {
			count('POST calculators API (basis)');
			const res = await operator.post(path, JSON.stringify({ ...good, basis: p.value }), {
				headers: JSON_HEADERS
			});
			await expectApiRefused(res, p.name.includes('1 MB') ? [413] : [400]);
		}
		for (const bad of INVALID_UTF8) {
			count('POST calculators API (invalid UTF-8)');
			const res = await operator.post(
				path,
				jsonWithRawBytes({ ...good, basis: '@@BYTES@@' }, bad.bytes) as BodyInit,
				{ headers: JSON_HEADERS }
			);
			await expectApiRefused(res, [400]);
		}
	});
});

describe('body size', () => {
	it('a body over the server-wide limit (BODY_SIZE_LIMIT, 30 MB in the start scripts) gets 413', async () => {
		const huge = new Uint8Array(31 * 1024 * 1024).fill(0x61);
		for (const [path, type] of [
			['/api/v1/calculators/bond-force', 'application/json'],
			['/admin/people/new?/save', 'application/x-www-form-urlencoded']
		]) {
			count(`POST ${path} (31 MB)`);
			const res = await admin.post(path, huge, { headers: { 'content-type': type } });
			const text = await res.text();
			expect(res.status, `${path}: ${text.slice(0, 200)}`).toBe(413);
			expect(text).not.toMatch(STACK);
		}
	});
});

describe('station gate API', () => {
	const path = '/api/v1/gate/checks';
	const headers = { ...JSON_HEADERS, authorization: '' };

	it('refuses bad bodies and hostile station or badge values with { error, fields }', async () => {
		const h = { ...headers, authorization: `Bearer ${gateKey}` };
		const client = newClient();
		for (const b of BAD_JSON_BODIES) {
			count('POST gate API (bad body)');
			const res = await client.post(path, b.body, {
				headers: { ...h, 'content-type': b.type }
			});
			await expectApiRefused(res);
		}
		for (const w of WRONG_JSON_TYPES) {
			for (const field of ['station', 'badge']) {
				count('POST gate API (wrong type)');
				const res = await client.post(
					path,
					JSON.stringify({ station: station.code, badge: 'B-1', [field]: w.value }),
					{ headers: h }
				);
				const body = await expectApiRefused(res, [400]);
				expect(Object.keys(body.fields ?? {})).toContain(field);
			}
		}
		for (const p of HOSTILE_TEXT) {
			count('POST gate API (badge)');
			const res = await client.post(
				path,
				JSON.stringify({ station: station.code, badge: p.value }),
				{
					headers: h
				}
			);
			if (res.status === 200) {
				// A badge that is merely odd is looked up and denied, never allowed.
				const body = (await res.json()) as { decision: string };
				expect(body.decision, p.name).toBe('deny');
				expect(p.value.length).toBeLessThanOrEqual(64);
				continue;
			}
			await expectApiRefused(res, [400, 413]);
		}
		for (const bad of INVALID_UTF8) {
			count('POST gate API (invalid UTF-8)');
			const res = await client.post(
				path,
				jsonWithRawBytes({ station: station.code, badge: 'B-@@BYTES@@' }, bad.bytes) as BodyInit,
				{ headers: h }
			);
			await expectApiRefused(res, [400]);
		}
	});
});

describe('records export filters', () => {
	it('refuses impossible dates and hostile values on their field, as JSON 400', async () => {
		const cases: [string, string][] = [
			...IMPOSSIBLE_DATES.map((d) => ['from', d] as [string, string]),
			...IMPOSSIBLE_DATES.map((d) => ['to', d] as [string, string]),
			...HOSTILE_TEXT.filter((p) => !p.name.includes('1 MB')).map(
				(p) => ['person', sent(p.value)] as [string, string]
			),
			...HOSTILE_TEXT.filter((p) => !p.name.includes('1 MB')).map(
				(p) => ['state', sent(p.value)] as [string, string]
			),
			['from', '2026-03-01&to=2026-02-01']
		];
		for (const [field, value] of cases) {
			count('GET /records/export.csv filter');
			const res = await hr.get(`/records/export.csv?${field}=${encodeURIComponent(value)}`);
			const text = await bodyOf(res);
			if (res.status === 200) {
				// Only a value that is a real filter may pass (a person id of digits, say).
				expect(field).toBe('person');
				expect(value).toMatch(/^[\p{L}\p{N}._/-]*$/u);
				continue;
			}
			expect(res.status, `${field}=${value.slice(0, 40)}: ${text.slice(0, 200)}`).toBe(400);
			const body = JSON.parse(text) as { error: string; fields: Record<string, string> };
			expect(Object.keys(body.fields).length).toBeGreaterThan(0);
		}
		count('GET /records/export.csv 1 MB query');
		const long = await hr.get(`/records/export.csv?person=${'9'.repeat(200_000)}`);
		expect(long.status).toBeGreaterThanOrEqual(400);
		expect(long.status).toBeLessThan(500);
	});
});

describe('retention forms', () => {
	it('the legal hold form refuses hostile employee numbers and reasons, and stores real text exactly', async () => {
		for (const p of HOSTILE_TEXT) {
			const person = await createTestPerson(['operator']);
			const [{ employee_no: employeeNo }] = await queryRows<{ employee_no: string }>(
				appDb(),
				'SELECT employee_no FROM people WHERE id = ?',
				[person.id]
			);
			count('POST /records/retention?/hold employeeNo');
			const res1 = await hr.postForm('/records/retention?/hold', {
				employeeNo: p.value,
				reason: 'Customer audit of the bonding line'
			});
			await expectFormRefused(res1, 'employeeNo');
			count('POST /records/retention?/hold reason');
			const res2 = await hr.postForm('/records/retention?/hold', { employeeNo, reason: p.value });
			const html = await bodyOf(res2);
			const holds = await queryRows<{ reason: string }>(
				appDb(),
				'SELECT reason FROM legal_holds WHERE person_id = ?',
				[person.id]
			);
			if (res2.status === 200 && holds.length) {
				expect(holds[0].reason, p.name).toBe(sent(p.value));
			} else {
				expect(res2.status, `${p.name}: ${html.slice(0, 200)}`).toBe(400);
				expect(html).toContain('role="alert"');
				expect(holds).toHaveLength(0);
			}
			if (/1 MB|NUL/.test(p.name)) expect(res2.status, p.name).toBe(400);
		}
		for (const p of UNUSUAL_TEXT) {
			const person = await createTestPerson(['operator']);
			const [{ employee_no: employeeNo }] = await queryRows<{ employee_no: string }>(
				appDb(),
				'SELECT employee_no FROM people WHERE id = ?',
				[person.id]
			);
			count('POST /records/retention?/hold (unusual text)');
			const res = await hr.postForm('/records/retention?/hold', { employeeNo, reason: p.value });
			expect(res.status, p.name).toBe(200);
			await bodyOf(res);
			const [row] = await queryRows<{ hex: string }>(
				appDb(),
				'SELECT HEX(reason) AS hex FROM legal_holds WHERE person_id = ?',
				[person.id]
			);
			expect(row?.hex, p.name).toBe(Buffer.from(p.value, 'utf8').toString('hex').toUpperCase());
		}
	});

	it('the rules form refuses hostile numbers of years on the field', async () => {
		const before = await queryRows(appDb(), 'SELECT * FROM retention_rules ORDER BY record_type');
		for (const n of [...HOSTILE_NUMBERS, ...HOSTILE_TEXT.map((p) => p.value)]) {
			count('POST /records/retention?/rules trainingRecordsYears');
			const res = await admin.postForm('/records/retention?/rules', {
				trainingRecordsYears: n,
				gateLogYears: '3',
				reason: 'Malformed input sweep'
			});
			const html = await expectFormRefused(res, `trainingRecordsYears=${n.slice(0, 30)}`);
			expect(res.status).toBe(400);
			expect(html).toMatch(/A whole number of years|Enter the number in plain digits/);
		}
		expect(await queryRows(appDb(), 'SELECT * FROM retention_rules ORDER BY record_type')).toEqual(
			before
		);
	});
});

describe('certification rules form', () => {
	it('refuses pass marks, validity and grace that are not plain numbers, storing no rule', async () => {
		const qualityP = await createTestPerson(['quality']);
		const quality = await signInWithPassword(qualityP.email, qualityP.password);
		const proc = await makeProcess();
		const ins = await makeInstructionRows(qualityP.id, proc.id, [
			{ letter: 'A', effectiveFrom: new Date(Date.now() - 86_400_000) }
		]);
		const valid = {
			previousVersion: '0',
			instructionIds: String(ins.id),
			passMarkPct: '80',
			practicalRequired: 'false',
			validityMonths: '12',
			graceDays: '14',
			reminderDays: '30, 7'
		};
		for (const field of ['passMarkPct', 'validityMonths', 'graceDays']) {
			for (const n of HOSTILE_NUMBERS) {
				count('POST /rules/[process]?/save number');
				const res = await quality.postForm(`/rules/${proc.code}?/save`, { ...valid, [field]: n });
				const html = await expectFormRefused(res, `${field}=${n}`);
				expect(res.status, `${field}=${n}`).toBe(400);
				expect(html).toContain('role="alert"');
			}
		}
		const rules = await queryRows(
			appDb(),
			'SELECT id FROM certification_rules WHERE process_id = ?',
			[proc.id]
		);
		expect(rules).toEqual([]);
		// The same form with plain numbers is saved.
		count('POST /rules/[process]?/save valid');
		const ok = await quality.postForm(`/rules/${proc.code}?/save`, valid);
		await ok.body?.cancel();
		expect(ok.status).toBe(303);
	});
});

describe('knowledge check attempts', () => {
	const state = async () =>
		(
			await queryRows<{ state: string; score_pct: number | null }>(
				appDb(),
				'SELECT state, score_pct FROM check_attempts WHERE id = ?',
				[attemptId]
			)
		)[0];

	it('saving hostile answers is refused or kept as typed; the attempt stays open', async () => {
		for (const v of [...HOSTILE_TEXT.map((p) => p.value), ...HOSTILE_NUMBERS]) {
			count('POST /training/attempts/[id]?/save');
			const res = await operator.postForm(`/training/attempts/${attemptId}?/save`, {
				q1: v,
				q4: v,
				q5: v
			});
			await bodyOf(res);
			expect([200, 400]).toContain(res.status);
			expect(await state()).toEqual({ state: 'open', score_pct: null });
		}
	});

	it('the submit API refuses bad bodies and wrong types with { error, fields }', async () => {
		const path = `/api/v1/attempts/${attemptId}/submit`;
		for (const b of BAD_JSON_BODIES) {
			count('POST attempt submit API (bad body)');
			const res = await operator.post(path, b.body, {
				headers: { 'content-type': b.type, accept: 'application/json' }
			});
			await expectApiRefused(res);
			if (b.type !== 'application/json') expect(res.status, b.name).toBe(415);
		}
		for (const w of [...WRONG_JSON_TYPES, { name: '1 MB', value: 'A'.repeat(1024 * 1024) }]) {
			count('POST attempt submit API (wrong type)');
			const res = await operator.post(path, JSON.stringify({ answers: { '1': [w.value] } }), {
				headers: JSON_HEADERS
			});
			await expectApiRefused(res);
			count('POST attempt submit API (answers wrong type)');
			const res2 = await operator.post(path, JSON.stringify({ answers: w.value }), {
				headers: JSON_HEADERS
			});
			await expectApiRefused(res2);
			expect(await state(), w.name).toEqual({ state: 'open', score_pct: null });
		}
	});
});
