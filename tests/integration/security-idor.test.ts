// IDOR sweep: every route whose path carries a parameter is listed here, read from src/routes, so a
// new one fails the first test until it is classified. For routes about one person's objects,
// somebody else gets 403/404 with none of that person's data in the body, and the owner (or a role
// the product lets see it) gets 200. For every route, ids that do not exist, negative, huge,
// non-numeric or of the wrong shape answer 404, never 500.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { readdirSync, statSync } from 'node:fs';
import { join, relative, sep } from 'node:path';
import { randomBytes } from 'node:crypto';
import type { ResultSetHeader } from 'mysql2/promise';
import { pool } from '../../src/lib/server/db/index';
import { startAttempt } from '../../src/lib/server/training/checks/index';
import { appDb, closeDbHelpers, queryRows } from '../helpers/db';
import { newClient, signInWithPassword, type HttpClient } from '../helpers/http-session';
import {
	createTestPerson,
	makeInstruction,
	type TestPerson
} from '../helpers/instruction-fixtures';
import { makeCheckFixture } from '../helpers/check-fixtures';
import {
	completedSignoff,
	insertCertificate,
	makeChecklist,
	makeInstructionRows,
	makeStation
} from '../helpers/training-fixtures';

const ROUTES_DIR = join(__dirname, '../../src/routes');
const ROUTE_FILE = /^\+(page\.server\.ts|page\.ts|page\.svelte|server\.ts)$/;

/** Route ids as SvelteKit names them, groups dropped: `/certificates/[id=id]/pdf`. */
function idBearingRoutes(): string[] {
	const out = new Set<string>();
	const walk = (dir: string) => {
		for (const name of readdirSync(dir)) {
			const full = join(dir, name);
			if (statSync(full).isDirectory()) walk(full);
			else if (ROUTE_FILE.test(name)) {
				const id = `/${relative(ROUTES_DIR, dir).split(sep).join('/')}`
					.replace(/\/\([^)]+\)/g, '')
					.replace(/^$/, '/');
				if (id.includes('[')) out.add(id || '/');
			}
		}
	};
	walk(ROUTES_DIR);
	return [...out].sort();
}

type Who = 'opA' | 'opB' | 'trainerOwn' | 'trainerOther' | 'quality' | 'hr' | 'admin' | 'lead';

interface Fx {
	personB: number;
	certB: number;
	attemptB: number;
	openAttemptB: number;
	signoffB: number;
	signoffItem: number;
	messageB: number;
	runId: number;
	doc: string;
	check: { id: number; version: number; question: number; code: string };
	station: string;
	process: string;
	plant: { line: number; process: number; shift: number; station: number };
}

interface IdRoute {
	/** owned: one person's object; role: shared objects behind a role; shared: any signed-in person; public: no sign-in. */
	kind: 'owned' | 'role' | 'shared' | 'public';
	method?: 'GET' | 'POST';
	api?: boolean;
	/** The values of the route's parameters, in order, for real objects. */
	params: (f: Fx) => string[];
	/** A body for POST routes, valid apart from the ids. */
	body?: () => { body: BodyInit; type?: string };
	/** Who gets 200 and who must get 403/404, for owned and role routes. */
	allowed?: Who[];
	denied?: Who[];
	/** The real sample itself answers 404 (no file or photo exists): only the refusals are checked. */
	sampleMissing?: boolean;
}

const json = (v: unknown) => () => ({ body: JSON.stringify(v), type: 'application/json' });

const CLASSIFIED: Record<string, IdRoute> = {
	'/admin/people/[id=id]': {
		kind: 'role',
		params: (f) => [String(f.personB)],
		allowed: ['admin'],
		denied: ['opA', 'opB', 'hr', 'quality', 'lead', 'trainerOther']
	},
	'/admin/plant/lines/[id=id]': {
		kind: 'role',
		params: (f) => [String(f.plant.line)],
		allowed: ['admin'],
		denied: ['opA', 'lead']
	},
	'/admin/plant/processes/[id=id]': {
		kind: 'role',
		params: (f) => [String(f.plant.process)],
		allowed: ['admin'],
		denied: ['opA']
	},
	'/admin/plant/shifts/[id=id]': {
		kind: 'role',
		params: (f) => [String(f.plant.shift)],
		allowed: ['admin'],
		denied: ['opA', 'lead']
	},
	'/admin/plant/stations/[id=id]': {
		kind: 'role',
		params: (f) => [String(f.plant.station)],
		allowed: ['admin'],
		denied: ['opA', 'lead']
	},
	'/calculators/[id=calculator]': { kind: 'shared', params: () => ['bond-force'] },
	'/certificates/[id=id]': {
		kind: 'owned',
		params: (f) => [String(f.certB)],
		allowed: ['opB', 'quality', 'admin'],
		denied: ['opA', 'trainerOther', 'trainerOwn', 'lead', 'hr']
	},
	'/certificates/[id=id]/pdf': {
		kind: 'owned',
		params: (f) => [String(f.certB)],
		allowed: ['opB', 'quality', 'admin'],
		denied: ['opA', 'trainerOther', 'lead', 'hr']
	},
	'/checks/[id=id]': {
		kind: 'role',
		params: (f) => [String(f.check.id)],
		allowed: ['trainerOther', 'quality'],
		denied: ['opA']
	},
	'/checks/[id=id]/stats': {
		kind: 'role',
		params: (f) => [String(f.check.id)],
		allowed: ['trainerOther', 'quality'],
		denied: ['opA']
	},
	'/checks/[id=id]/versions/[v=id]': {
		kind: 'role',
		params: (f) => [String(f.check.id), String(f.check.version)],
		allowed: ['trainerOther', 'quality'],
		denied: ['opA']
	},
	'/checks/[id=id]/versions/[v=id]/questions/[q=id]': {
		kind: 'role',
		params: (f) => [String(f.check.id), String(f.check.version), String(f.check.question)],
		denied: ['opA']
	},
	'/checks/[id=id]/versions/[v=id]/questions/new': {
		kind: 'role',
		params: (f) => [String(f.check.id), String(f.check.version)],
		denied: ['opA']
	},
	'/help/[slug]': { kind: 'shared', params: () => ['records'] },
	'/instructions/[doc=docNumber]': { kind: 'shared', params: (f) => [f.doc] },
	'/instructions/[doc=docNumber]/acknowledge': { kind: 'shared', params: (f) => [f.doc] },
	'/instructions/[doc=docNumber]/revisions/[rev=revision]': {
		kind: 'shared',
		params: (f) => [f.doc, 'A']
	},
	'/instructions/[doc=docNumber]/revisions/[rev=revision]/edit': {
		kind: 'role',
		params: (f) => [f.doc, 'B'],
		allowed: ['trainerOther'],
		denied: ['opA', 'lead', 'hr']
	},
	'/instructions/[doc=docNumber]/revisions/[rev=revision]/files/[file=id]': {
		kind: 'shared',
		params: (f) => [f.doc, 'A', '1'],
		sampleMissing: true
	},
	'/instructions/[doc=docNumber]/revisions/[rev=revision]/review': {
		kind: 'role',
		params: (f) => [f.doc, 'A'],
		denied: ['opA', 'lead', 'hr']
	},
	'/messages/[id=id]': {
		kind: 'owned',
		params: (f) => [String(f.messageB)],
		allowed: ['opB'],
		denied: ['opA', 'trainerOther', 'quality', 'hr', 'admin']
	},
	'/records/people/[id=id]': {
		kind: 'role',
		params: (f) => [String(f.personB)],
		allowed: ['hr', 'quality'],
		denied: ['opA', 'opB', 'trainerOwn', 'lead', 'admin']
	},
	'/records/people/[id=id]/history.json': {
		kind: 'role',
		params: (f) => [String(f.personB)],
		allowed: ['hr', 'quality'],
		denied: ['opA', 'opB', 'trainerOwn', 'lead', 'admin']
	},
	'/records/people/[id=id]/history.pdf': {
		kind: 'role',
		params: (f) => [String(f.personB)],
		allowed: ['hr', 'quality'],
		denied: ['opA', 'opB', 'lead']
	},
	'/records/retention/runs/[id=id]': {
		kind: 'role',
		params: (f) => [String(f.runId)],
		allowed: ['hr', 'admin'],
		denied: ['opA', 'quality', 'lead']
	},
	'/rules/[process=processCode]': {
		kind: 'role',
		params: (f) => [f.process],
		allowed: ['quality', 'admin'],
		denied: ['opA', 'trainerOther', 'lead']
	},
	'/signoffs/[id=id]': {
		kind: 'owned',
		params: (f) => [String(f.signoffB)],
		allowed: ['opB', 'trainerOwn', 'quality', 'admin'],
		denied: ['opA', 'trainerOther', 'lead', 'hr']
	},
	'/signoffs/[id=id]/photos/[item=id]': {
		kind: 'owned',
		params: (f) => [String(f.signoffB), String(f.signoffItem)],
		denied: ['opA', 'trainerOther', 'lead', 'hr'],
		sampleMissing: true
	},
	'/signoffs/checklists/[id=id]': { kind: 'role', params: () => ['1'], denied: ['opA', 'lead'] },
	'/stations/[code=stationCode]': { kind: 'shared', params: (f) => [f.station] },
	'/training/attempts/[id=id]': {
		kind: 'owned',
		params: (f) => [String(f.attemptB)],
		// Trainers and quality review submitted attempts (item statistics); nobody else does.
		allowed: ['opB', 'trainerOther', 'quality'],
		denied: ['opA', 'lead', 'hr', 'admin']
	},
	'/training/checks/[code=checkCode]': { kind: 'shared', params: (f) => [f.check.code] },
	'/stations/[code=stationCode]/gate': { kind: 'public', params: (f) => [f.station] },
	'/verify/[token]': { kind: 'public', params: () => ['x'.repeat(43)], sampleMissing: true },
	'/api/v1/attempts/[id=id]': {
		kind: 'owned',
		api: true,
		params: (f) => [String(f.attemptB)],
		allowed: ['opB', 'trainerOther', 'quality'],
		denied: ['opA', 'lead', 'hr', 'admin']
	},
	'/api/v1/attempts/[id=id]/submit': {
		kind: 'owned',
		api: true,
		method: 'POST',
		params: (f) => [String(f.openAttemptB)],
		body: json({ answers: {} }),
		// Submitting is the owner's alone; the positive case is in the mass-assignment sweep.
		denied: ['opA', 'trainerOther', 'quality', 'admin']
	},
	'/api/v1/calculators/[id]': { kind: 'shared', api: true, params: () => ['bond-force'] },
	'/api/v1/instructions/[doc=docNumber]': { kind: 'shared', api: true, params: (f) => [f.doc] },
	'/api/v1/instructions/[doc=docNumber]/revisions/[rev=revision]': {
		kind: 'shared',
		api: true,
		params: (f) => [f.doc, 'A']
	},
	'/api/v1/instructions/[doc=docNumber]/revisions/[rev=revision]/draft': {
		kind: 'role',
		api: true,
		method: 'POST',
		params: (f) => [f.doc, 'B'],
		// A stale version: refused with 409 when the revision exists, so nothing is written.
		body: json({ source: 'IDOR sweep', version: 999_999 }),
		denied: ['opA', 'lead', 'hr']
	},
	'/api/v1/instructions/[doc=docNumber]/revisions/[rev=revision]/files': {
		kind: 'role',
		api: true,
		method: 'POST',
		params: (f) => [f.doc, 'B'],
		body: () => {
			const form = new FormData();
			form.append('file', new Blob([new Uint8Array([0, 1, 2])]), 'x.bin');
			return { body: form };
		},
		denied: ['opA', 'lead', 'hr']
	}
};

/** Values for a parameter that match no object: by matcher, the shapes a tamperer tries. */
function bogusValues(param: string): string[] {
	const matcher = /=(\w+)\]/.exec(param)?.[1];
	const common = ['99999999999999999999', '-1', 'abc', '%00', "1'or'1'='1", '..%2F..%2Fetc'];
	switch (matcher) {
		case 'id':
			return [...common, '0', '9999999999999999', '1.5', '1e3', '0x10', ' 1'];
		case 'docNumber':
			return [...common, 'WI-ZZZ-999'];
		case 'revision':
			return [...common, 'ZZ'];
		case 'checkCode':
			return [...common, 'KC-NONE-9'];
		case 'processCode':
			return [...common, 'NOPE-9'];
		case 'stationCode':
			return [...common, 'L9-NONE-99'];
		default:
			return [...common, 'no-such-thing', 'x'.repeat(43)];
	}
}

function fill(route: string, values: string[]): string {
	let k = 0;
	return route.replace(/\[[^\]]+\]/g, () => encodeURIComponent(values[k++]).replace(/%25/g, '%'));
}

const clients = {} as Record<Who | 'all', HttpClient>;
const people = {} as Record<'opA' | 'opB', TestPerson>;
let fx: Fx;
let secrets: string[] = [];
let sweptRoutes = 0;
let requests = 0;

async function insert(sql: string, params: unknown[]) {
	const [res] = await appDb().query<ResultSetHeader>(sql, params);
	return res.insertId;
}

beforeAll(async () => {
	const t = randomBytes(3).toString('hex').toUpperCase();
	const trainerOwn = await createTestPerson(['trainer']);
	const trainerOther = await createTestPerson(['trainer']);
	const quality = await createTestPerson(['quality']);
	const made: Record<string, TestPerson> = {
		opA: await createTestPerson(['operator'], `Đặng Văn IDORA${t}`),
		opB: await createTestPerson(['operator'], `Bùi Thị IDORB${t}`),
		trainerOwn,
		trainerOther,
		quality,
		hr: await createTestPerson(['hr']),
		admin: await createTestPerson(['admin']),
		lead: await createTestPerson(['lead']),
		all: await createTestPerson(['operator', 'trainer', 'quality', 'lead', 'hr', 'admin'])
	};
	people.opA = made.opA;
	people.opB = made.opB;
	for (const [who, p] of Object.entries(made)) {
		clients[who as Who] = await signInWithPassword(p.email, p.password);
	}
	const B = made.opB;
	const checkFx = await makeCheckFixture(trainerOwn, quality);
	const [{ id: ruleId }] = await queryRows<{ id: number }>(
		appDb(),
		'SELECT id FROM certification_rules WHERE process_id = ?',
		[checkFx.processId]
	);
	const certB = await insertCertificate(B.id, checkFx.processId, ruleId);
	const [cert] = await queryRows<{ number: string }>(
		appDb(),
		'SELECT number FROM certificates WHERE id = ?',
		[certB]
	);
	const submitted = (await startAttempt(B.actor, checkFx.processId)).id;
	await appDb().query(
		"UPDATE check_attempts SET state = 'submitted', submitted_at = ?, score_pct = 40, passed = 0 WHERE id = ?",
		[new Date(), submitted]
	);
	const openAttemptB = (await startAttempt(B.actor, checkFx.processId)).id;
	const rows = await makeInstructionRows(trainerOwn.id, checkFx.processId, [
		{ letter: 'A', effectiveFrom: new Date(Date.now() - 86_400_000) }
	]);
	const checklist = await makeChecklist(checkFx.processId, rows.revisionIds[0], trainerOwn.id);
	const signoffB = await completedSignoff(
		B.id,
		trainerOwn.id,
		checklist,
		checkFx.processId,
		rows.revisionIds[0],
		true
	);
	const [item] = await queryRows<{ id: number }>(
		appDb(),
		'SELECT id FROM checklist_items WHERE checklist_id = ?',
		[checklist]
	);
	const messageB = await insert(
		`INSERT INTO mail_outbox (dedupe_key, kind, to_address, to_person_id, about_person_id, subject,
		   text_body, html_body, created_at, send_after)
		 VALUES (?, 'assignment', ?, ?, ?, ?, ?, ?, ?, ?)`,
		[
			`idor:${t}`,
			B.email,
			B.id,
			B.id,
			`Assignment for IDORB${t}`,
			`Body IDORB${t}`,
			`<p>Body IDORB${t}</p>`,
			new Date(),
			new Date()
		]
	);
	const hrClient = clients.hr;
	const dry = await hrClient.postForm('/records/retention?/dryRun', {});
	const runId = Number(/runs\/(\d+)/.exec(dry.headers.get('location') ?? '')?.[1]);
	const doc = await makeInstruction(trainerOwn, quality, [
		{ source: '# A', effectiveFrom: new Date(Date.now() - 3_600_000) },
		{ source: '# B', stop: 'draft' }
	]);
	const [q] = await queryRows<{ id: number }>(
		appDb(),
		'SELECT id FROM check_questions WHERE check_version_id = ? LIMIT 1',
		[checkFx.versionId]
	);
	const station = await makeStation([checkFx.processId]);
	const [proc] = await queryRows<{ code: string }>(
		appDb(),
		'SELECT code FROM processes WHERE id = ?',
		[checkFx.processId]
	);
	const first = async (table: string) =>
		(await queryRows<{ id: number }>(appDb(), `SELECT MIN(id) AS id FROM ${table}`))[0].id;
	fx = {
		personB: B.id,
		certB,
		attemptB: submitted,
		openAttemptB,
		signoffB,
		signoffItem: item.id,
		messageB,
		runId,
		doc: doc.docNumber,
		check: { id: checkFx.checkId, version: checkFx.versionId, question: q.id, code: checkFx.code },
		station: station.code,
		process: proc.code,
		plant: {
			line: await first('`lines`'),
			process: await first('processes'),
			shift: await first('shifts'),
			station: await first('stations')
		}
	};
	// What must never show in a refusal: B's name, badge, certificate number and message text.
	secrets = [B.displayName, B.badge!, cert.number, `IDORB${t}`];
}, 120_000);

afterAll(async () => {
	console.info(`IDOR sweep: ${sweptRoutes} id-bearing routes, ${requests} requests`);
	await closeDbHelpers();
	await pool.end();
});

function send(client: HttpClient, route: IdRoute, path: string) {
	requests++;
	const accept = route.api ? 'application/json' : 'text/html';
	if ((route.method ?? 'GET') === 'GET') return client.get(path, { headers: { accept } });
	const b = route.body?.() ?? { body: '' };
	const headers: Record<string, string> = { accept };
	if (b.type) headers['content-type'] = b.type;
	return client.post(path, b.body, { headers });
}

const STACK = /node_modules|\.(?:js|ts):\d+:\d+|\n\s+at [\w.<>]+ \(/;

describe('the list of id-bearing routes', () => {
	it('every route with a parameter under src/routes is classified here, and every row exists', () => {
		const found = idBearingRoutes();
		const unclassified = found.filter((r) => !(r in CLASSIFIED));
		expect(
			unclassified,
			'classify these routes in tests/integration/security-idor.test.ts'
		).toEqual([]);
		expect(Object.keys(CLASSIFIED).filter((r) => !found.includes(r))).toEqual([]);
		expect(found.length).toBeGreaterThan(30);
	});
});

describe.each(Object.entries(CLASSIFIED))('%s', (route, row) => {
	it('refuses those who must not see it, without their data; lets the allowed in', async () => {
		sweptRoutes++;
		const path = fill(route, row.params(fx));
		for (const who of row.denied ?? []) {
			const res = await send(clients[who], row, path);
			const text = await res.text();
			expect([403, 404], `${who} ${path}: ${res.status} ${text.slice(0, 200)}`).toContain(
				res.status
			);
			for (const s of secrets) expect(text, `${who} ${path}`).not.toContain(s);
			expect(text).not.toMatch(STACK);
		}
		for (const who of row.allowed ?? []) {
			const res = await send(clients[who], row, path);
			const text = await res.text();
			expect(res.status, `${who} ${path}: ${text.slice(0, 200)}`).toBe(200);
		}
		if (row.kind !== 'public' && row.kind !== 'owned' && !row.sampleMissing) {
			// The sample is real: the all-roles person is not turned away by "not found".
			const res = await send(clients.all, row, path);
			await res.body?.cancel();
			expect(res.status, path).not.toBe(404);
			expect(res.status).toBeLessThan(500);
		}
	});

	it('answers 404 for ids that do not exist, negative, huge, non-numeric or malformed', async () => {
		const params = route.match(/\[[^\]]+\]/g) ?? [];
		const real = row.params(fx);
		const client = row.kind === 'public' ? newClient() : clients.all;
		for (let k = 0; k < params.length; k++) {
			for (const bogus of bogusValues(params[k])) {
				const values = [...real];
				values[k] = bogus;
				const path = fill(route, values);
				const res = await send(client, row, path);
				const text = await res.text();
				expect(res.status, `${path}: ${text.slice(0, 200)}`).toBe(404);
				expect(text).not.toMatch(STACK);
			}
		}
	});
});

describe('routes about the signed-in person take no id', () => {
	it('my-records (page, JSON, PDF) ignore a person id in the query and show only the own records', async () => {
		for (const path of ['/my-records', '/my-records.json', '/my-records.pdf']) {
			for (const q of [`?personId=${fx.personB}`, `?id=${fx.personB}`, `?person=${fx.personB}`]) {
				requests++;
				const res = await clients.opA.get(path + q);
				const body = Buffer.from(await res.arrayBuffer());
				expect(res.status, path + q).toBe(200);
				const text = body.toString('latin1') + body.toString('utf8');
				for (const s of secrets) expect(text, path + q).not.toContain(s);
				if (path === '/my-records.json')
					expect(body.toString('utf8')).toContain(String(people.opA.id));
			}
		}
	});

	it("submitting somebody else's open attempt changes nothing", async () => {
		const [row] = await queryRows<{ state: string }>(
			appDb(),
			'SELECT state FROM check_attempts WHERE id = ?',
			[fx.openAttemptB]
		);
		expect(row.state).toBe('open');
		requests++;
		const res = await clients.opA.postForm(`/training/attempts/${fx.openAttemptB}?/submit`, {
			q1: 'a'
		});
		expect(res.status).toBe(404);
		const [after] = await queryRows<{ state: string }>(
			appDb(),
			'SELECT state FROM check_attempts WHERE id = ?',
			[fx.openAttemptB]
		);
		expect(after.state).toBe('open');
	});

	it('an attempt still open is its owner’s alone: trainers and quality get 404 until it is submitted', async () => {
		for (const who of ['trainerOther', 'quality', 'opA'] as const) {
			for (const [path, accept] of [
				[`/training/attempts/${fx.openAttemptB}`, 'text/html'],
				[`/api/v1/attempts/${fx.openAttemptB}`, 'application/json']
			]) {
				requests++;
				const res = await clients[who].get(path, { headers: { accept } });
				const text = await res.text();
				expect(res.status, `${who} ${path}`).toBe(404);
				for (const s of secrets) expect(text, `${who} ${path}`).not.toContain(s);
			}
		}
		requests++;
		const own = await clients.opB.get(`/training/attempts/${fx.openAttemptB}`);
		await own.body?.cancel();
		expect(own.status).toBe(200);
	});

	it("operator A's lists never show B's certificates, attempts, sign-offs or messages", async () => {
		for (const path of ['/certificates', '/messages', '/my-signoffs', '/training/checks', '/']) {
			requests++;
			const res = await clients.opA.get(path);
			const text = await res.text();
			expect(res.status, path).toBe(200);
			for (const s of secrets) expect(text, path).not.toContain(s);
		}
	});
});
