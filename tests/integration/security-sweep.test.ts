// Cross-origin requests that would change something, sent with the signed-in cookie of a role that
// IS allowed: from https://evil.example, and without Origin but with `Sec-Fetch-Site: cross-site`,
// each as a urlencoded form, a multipart form, text/plain and JSON. Every one must be refused with
// 403 and must change nothing: row counts, highest ids and table checksums are read with SQL
// before and after. SvelteKit answers the three form encodings itself (its Origin check, before
// any hook); the app's `crossSite` hook (src/hooks.server.ts) answers the rest.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Role } from '../../src/lib/roles';
import { DEMO_PASSWORD } from '../../scripts/demo-accounts.js';
import { closeDbHelpers, ownerDb, queryRows } from '../helpers/db';
import {
	APP_URL,
	formBody,
	signInAsDemo,
	type FormFields,
	type HttpClient
} from '../helpers/http-session';
import {
	createTestPerson as createFixturePerson,
	makeInstruction
} from '../helpers/instruction-fixtures';
import { checkResponse, describeTally, newTally } from '../helpers/response-checks';
import { pathMatcher, publicPattern, routeInventory } from '../helpers/route-inventory';

const EVIL = 'https://evil.example';

interface Target {
	label: string;
	role: Role;
	path: string;
	fields: FormFields;
	/** Tables the endpoint writes; audit_events is always watched as well. */
	tables: string[];
}

/** Looked up in the test database (demo data), so the requests name real records. */
interface Ids {
	personId: number;
	stationId: number;
	supervisorId: number;
	draft: { doc: string; letter: string };
	review: { doc: string; letter: string };
	/** An instruction with a revision in force, for the acknowledgement. */
	effectiveDoc: string;
	certificateId: number;
	attemptId: number;
}

function targets(ids: Ids, tag: string): Target[] {
	const draft = `/instructions/${ids.draft.doc}/revisions/${ids.draft.letter}`;
	const review = `/instructions/${ids.review.doc}/revisions/${ids.review.letter}`;
	const apiDraft = `/api/v1${draft}`;
	return [
		{
			label: 'admin: new person',
			role: 'admin',
			path: '/admin/people/new?/save',
			fields: {
				employeeNo: `X-${tag}`,
				displayName: `Planted ${tag}`,
				badgeNo: `X-${tag}-B`,
				roles: ['admin'],
				employmentType: 'employee',
				locale: 'en'
			},
			tables: ['people', 'role_assignments']
		},
		{
			label: 'admin: person edit',
			role: 'admin',
			path: `/admin/people/${ids.personId}?/save`,
			fields: { displayName: `Renamed ${tag}`, roles: ['admin'], locale: 'en' },
			tables: ['people', 'role_assignments']
		},
		{
			label: 'admin: API key',
			role: 'admin',
			path: '/admin/api-keys?/create',
			fields: { name: `planted ${tag}`, scope: 'gate', stationId: ids.stationId },
			tables: ['api_keys']
		},
		{
			label: 'author: draft save',
			role: 'trainer',
			path: `${draft}/edit?/save`,
			fields: { source: `# Planted ${tag}`, version: 1 },
			tables: ['revisions']
		},
		{
			label: 'approver: publish (sign)',
			role: 'quality',
			path: `${review}/review?/sign`,
			fields: { meaning: 'approved', password: DEMO_PASSWORD, effectiveDate: '2026-01-01' },
			tables: ['revisions', 'signatures']
		},
		{
			label: 'operator: acknowledge (may issue a certificate)',
			role: 'operator',
			path: `/instructions/${ids.effectiveDoc}/acknowledge`,
			fields: { confirm: 'true' },
			tables: ['acknowledgements', 'certificates']
		},
		{
			label: 'operator: check submit',
			role: 'operator',
			path: `/training/attempts/${ids.attemptId}?/submit`,
			fields: { answers: '{}' },
			tables: ['check_attempts', 'attempt_items', 'certificates']
		},
		{
			label: 'quality: certificate suspend',
			role: 'quality',
			path: `/certificates/${ids.certificateId}?/suspend`,
			fields: { reason: `Planted suspension ${tag}`, password: DEMO_PASSWORD },
			tables: ['certificates']
		},
		{
			label: 'quality: rule save',
			role: 'quality',
			path: '/rules/COG-MB?/save',
			fields: { previousVersion: 1, passMarkPct: 10, practicalRequired: 'false' },
			tables: ['certification_rules', 'rule_instructions']
		},
		{
			label: 'lead: supervised run grant',
			role: 'lead',
			path: '/supervised-runs?/grant',
			fields: {
				personId: ids.personId,
				stationId: ids.stationId,
				supervisorId: ids.supervisorId,
				until: '23:59',
				reason: `Planted run ${tag}`
			},
			tables: ['supervised_runs', 'mail_outbox']
		},
		{
			label: 'admin: retention run',
			role: 'admin',
			path: '/records/retention?/run',
			fields: { password: DEMO_PASSWORD },
			tables: ['retention_runs', 'retention_dispositions']
		},
		// Every unsafe method of the JSON API (the test below checks this list is complete).
		{
			label: 'API: attempt submit',
			role: 'operator',
			path: `/api/v1/attempts/${ids.attemptId}/submit`,
			fields: { answers: '{}' },
			tables: ['check_attempts', 'attempt_items']
		},
		{
			label: 'API: draft save',
			role: 'trainer',
			path: `${apiDraft}/draft`,
			fields: { source: `# Planted ${tag}`, version: 1 },
			tables: ['revisions']
		},
		{
			label: 'API: file upload',
			role: 'trainer',
			path: `${apiDraft}/files`,
			fields: { file: 'planted' },
			tables: ['revision_files']
		},
		{
			label: 'API: instruction preview',
			role: 'trainer',
			path: '/api/v1/instructions/preview',
			fields: { source: '# x' },
			tables: []
		},
		{
			label: 'API: calculator run',
			role: 'operator',
			path: '/api/v1/calculators/bond-force',
			fields: { areaMm2: 1 },
			tables: []
		},
		{
			label: 'API: gate check',
			role: 'admin',
			path: '/api/v1/gate/checks',
			fields: { station: 'L2-FOG-03', badge: 'B-NONE' },
			tables: ['gate_checks']
		}
	];
}

type Encoding = 'urlencoded' | 'multipart' | 'text/plain' | 'json';
const ENCODINGS: Encoding[] = ['urlencoded', 'multipart', 'text/plain', 'json'];

function encode(fields: FormFields, how: Encoding): { body: BodyInit; type?: string } {
	if (how === 'urlencoded') {
		return { body: formBody(fields), type: 'application/x-www-form-urlencoded' };
	}
	if (how === 'multipart') {
		const form = new FormData();
		for (const [k, v] of formBody(fields)) form.append(k, v);
		return { body: form }; // fetch writes the boundary into the type
	}
	if (how === 'text/plain') {
		// What a <form enctype="text/plain"> sends: name=value lines.
		const lines = [...formBody(fields)].map(([k, v]) => `${k}=${v}`);
		return { body: lines.join('\r\n'), type: 'text/plain' };
	}
	return { body: JSON.stringify(fields), type: 'application/json' };
}

const VARIANTS = [
	{ label: `Origin ${EVIL}`, headers: { origin: EVIL } as Record<string, string> },
	{ label: 'no Origin, Sec-Fetch-Site: cross-site', headers: { 'sec-fetch-site': 'cross-site' } }
];

/**
 * Sent with fetch itself: the session client always adds a same-origin Origin, and these requests
 * need none at all in one variant.
 */
function sendCrossSite(
	client: HttpClient,
	path: string,
	how: Encoding,
	extra: Record<string, string>,
	fields: FormFields
) {
	const { body, type } = encode(fields, how);
	const headers = new Headers(extra);
	if (type) headers.set('content-type', type);
	headers.set('accept', how === 'json' ? 'application/json' : 'text/html');
	headers.set('cookie', [...client.cookies].map(([k, v]) => `${k}=${v}`).join('; '));
	return fetch(new URL(path, APP_URL), { method: 'POST', body, headers, redirect: 'manual' });
}

/** Counts, highest ids and a checksum of each table, plus the audit trail's length and head. */
async function snapshot(tables: string[]): Promise<Record<string, unknown>> {
	const db = ownerDb();
	const out: Record<string, unknown> = {};
	const [audit] = await queryRows(db, 'SELECT COUNT(*) AS n, MAX(seq) AS head FROM audit_events');
	out.audit_events = { n: Number(audit.n), head: Number(audit.head) };
	for (const t of tables) {
		const [row] = await queryRows(db, `SELECT COUNT(*) AS n FROM \`${t}\``);
		const [sum] = await queryRows(db, `CHECKSUM TABLE \`${t}\``);
		out[t] = { n: Number(row.n), checksum: String(sum.Checksum) };
	}
	return out;
}

const clients = new Map<Role, HttpClient>();
let ids: Ids;
const tally = newTally();
const answeredBy = { sveltekit: 0, app: 0 };
let attempts = 0;
const tag = Date.now().toString(36).toUpperCase();

async function one<T extends Record<string, unknown>>(sql: string): Promise<T | undefined> {
	return (await queryRows<T>(ownerDb(), sql))[0];
}

beforeAll(async () => {
	const person = await one<{ id: number }>(
		"SELECT p.id FROM people p JOIN role_assignments r ON r.person_id = p.id WHERE r.role = 'operator' AND p.active = 1 ORDER BY p.id LIMIT 1"
	);
	const supervisor = await one<{ id: number }>(
		"SELECT p.id FROM people p JOIN role_assignments r ON r.person_id = p.id WHERE r.role = 'trainer' AND p.active = 1 ORDER BY p.id LIMIT 1"
	);
	const station = await one<{ id: number }>("SELECT id FROM stations WHERE code = 'L2-FOG-03'");
	// A draft and a revision in review of an instruction of this file's own, walked through the
	// real workflow, so the draft save and the publish name revisions in those states.
	const author = await createFixturePerson(['trainer']);
	const approver = await createFixturePerson(['quality']);
	const draftFx = await makeInstruction(author, approver, [{ source: '# Sweep', stop: 'draft' }]);
	const reviewFx = await makeInstruction(author, approver, [{ source: '# Sweep', stop: 'review' }]);
	const effective = await one<{ doc: string }>(
		"SELECT i.doc_number AS doc FROM revisions r JOIN instructions i ON i.id = r.instruction_id WHERE r.state = 'approved' AND r.effective_from <= NOW() ORDER BY r.id LIMIT 1"
	);
	const certificate = await one<{ id: number }>('SELECT id FROM certificates ORDER BY id LIMIT 1');
	const attempt = await one<{ id: number }>(
		"SELECT id FROM check_attempts ORDER BY state = 'open' DESC, id LIMIT 1"
	);
	ids = {
		personId: person!.id,
		supervisorId: supervisor!.id,
		stationId: station!.id,
		draft: { doc: draftFx.docNumber, letter: draftFx.letters[0] },
		review: { doc: reviewFx.docNumber, letter: reviewFx.letters[0] },
		effectiveDoc: effective!.doc,
		certificateId: certificate?.id ?? 999999999,
		attemptId: attempt?.id ?? 999999999
	};
	for (const role of new Set(targets(ids, tag).map((t) => t.role))) {
		clients.set(role, await signInAsDemo(role));
	}
});

afterAll(async () => {
	console.info(
		`cross-origin sweep: ${attempts} requests refused (${answeredBy.sveltekit} by SvelteKit's ` +
			`Origin check, ${answeredBy.app} by the app's crossSite hook) over ` +
			`${targets(ids, tag).length} endpoints × ${VARIANTS.length} variants × ${ENCODINGS.length} encodings`
	);
	console.info(describeTally('cross-origin answers', tally));
	await closeDbHelpers();
});

describe('the cross-origin target list', () => {
	it('is sent input that the app accepts from itself (a new person, from the same origin)', async () => {
		// The control: the same fields posted the way the app's own form posts them do create the
		// person, so "nothing changed" below is the Origin check's doing, not the input's.
		const target = targets(ids, tag).find((t) => t.label === 'admin: new person')!;
		const employeeNo = `Y-${tag}`;
		const fields = {
			...target.fields,
			employeeNo,
			badgeNo: `${employeeNo}-B`,
			roles: ['operator']
		};
		const res = await clients.get('admin')!.postForm(target.path, fields);
		await res.body?.cancel();
		expect(res.status).toBe(303);
		const rows = await queryRows<{ id: number }>(
			ownerDb(),
			'SELECT id FROM people WHERE employee_no = ?',
			[employeeNo]
		);
		expect(rows).toHaveLength(1);
		await ownerDb().query('UPDATE people SET active = 0 WHERE id = ?', [rows[0].id]);
	});

	it('holds every unsafe method of the JSON API', async () => {
		const list = targets(ids, tag).map((t) => t.path);
		const missing: string[] = [];
		for (const r of routeInventory()) {
			if (r.kind !== 'endpoint' || !publicPattern(r.routeId).startsWith('/api/')) continue;
			if (['GET', 'HEAD', 'OPTIONS'].includes(r.method)) continue;
			const matches = await pathMatcher(r.routeId);
			if (!list.some((p) => matches(p))) missing.push(`${r.method} ${publicPattern(r.routeId)}`);
		}
		expect(missing).toEqual([]);
	});
});

// The rows are named at collection time; their ids come from the database in beforeAll.
const PLACEHOLDER: Ids = {
	personId: 1,
	stationId: 1,
	supervisorId: 1,
	draft: { doc: 'WI-X-1', letter: 'A' },
	review: { doc: 'WI-X-1', letter: 'A' },
	effectiveDoc: 'WI-X-1',
	certificateId: 1,
	attemptId: 1
};

describe.each(targets(PLACEHOLDER, tag).map((t) => [t.label] as const))('%s', (label) => {
	it.each(VARIANTS.map((v) => [v.label, v] as const))(
		'refused, nothing changed: %s',
		async (_v, variant) => {
			const target = targets(ids, tag).find((t) => t.label === label)!;
			const client = clients.get(target.role)!;
			const before = await snapshot(target.tables);
			for (const how of ENCODINGS) {
				const res = await sendCrossSite(client, target.path, how, variant.headers, target.fields);
				const body = await res.text();
				const where = `POST ${target.path} (${how}, ${variant.label}) as ${target.role}`;
				attempts++;
				expect(res.status, `${where}: ${body.slice(0, 200)}`).toBe(403);
				if (body.includes('Cross-site request refused.')) {
					// The app's hook: a JSON or plain answer with every security header.
					answeredBy.app++;
					checkResponse(res, body, where, true, tally);
				} else {
					// SvelteKit's Origin check answers before any hook runs, so its plain-text (or JSON)
					// answer carries none of the app's headers; only its message and the absence of a
					// trace are checked.
					expect(body, where).toMatch(/Cross-site POST form submissions are forbidden/);
					expect(how, `${where}: SvelteKit checks only the form encodings`).not.toBe('json');
					answeredBy.sveltekit++;
				}
			}
			expect(await snapshot(target.tables), `${target.label}: tables after the attempts`).toEqual(
				before
			);
		}
	);
});
