// The Readiness board against the real database and the built server: each certificate state's
// cell, station coverage agreeing with the station gate for the same people, the minimum flag,
// the CSV export read back, and refusals (roles, bad query, unknown line).
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
	APP_URL,
	signInAsDemo,
	signInWithPassword,
	type HttpClient
} from '../helpers/http-session';
import {
	insertCertificate,
	makeCheck,
	makeProcess,
	makeRule,
	makeStation,
	submittedAttempt
} from '../helpers/training-fixtures';
import { createApiKey } from '../../src/lib/server/apikeys';
import { pool } from '../../src/lib/server/db';
import type { ReadinessBoard } from '../../src/lib/server/readiness';
import { parseCsv } from '../helpers/csv-parse';

const DAY = 86_400_000;
const INJECTED = '=HYPERLINK("http://example.invalid","open me")';

let lead: HttpClient;
let admin: TestPerson;
let p1: { id: number; code: string };
let p2: { id: number; code: string };
let single: { id: number; code: string };
let double: { id: number; code: string };
const who: Record<string, TestPerson> = {};

async function person(name: string, opts: Partial<Parameters<typeof createTestPerson>[0]> = {}) {
	const p = await createTestPerson({
		roles: ['operator'],
		withEmail: false,
		line: 'L1',
		displayName: name,
		...opts
	});
	await appDb().query(
		"UPDATE people SET shift_id = (SELECT id FROM shifts WHERE code = 'A' LIMIT 1) WHERE id = ?",
		[p.id]
	);
	who[name] = p;
	return p;
}

async function board(client: HttpClient, query: string) {
	const res = await client.get(`/api/v1/readiness?${query}`);
	return { status: res.status, body: await res.json() };
}

const query = () => `line=L1&shift=A&process=${p1.code},${p2.code}`;
const row = (b: ReadinessBoard, name: string) => b.people.find((p) => p.id === who[name].id)!;

beforeAll(async () => {
	admin = await createTestPerson({ roles: ['admin'] });
	p1 = await makeProcess();
	p2 = await makeProcess();
	const r1 = await makeRule({ processId: p1.id, createdBy: admin.id, instructionIds: [] });
	const r2 = await makeRule({ processId: p2.id, createdBy: admin.id, instructionIds: [] });
	single = await makeStation([p1.id]);
	double = await makeStation([p1.id, p2.id]);
	await appDb().query('UPDATE stations SET min_qualified = 3 WHERE id = ?', [single.id]);
	const now = Date.now();

	await person('Valid Vân', { employmentType: 'employee' });
	await insertCertificate(who['Valid Vân'].id, p1.id, r1, { expiresAt: new Date(now + 200 * DAY) });
	await insertCertificate(who['Valid Vân'].id, p2.id, r2, { expiresAt: new Date(now + 45 * DAY) });
	await person('Expiring Eun');
	await insertCertificate(who['Expiring Eun'].id, p1.id, r1, {
		expiresAt: new Date(now + 10 * DAY)
	});
	await person('Grace Gustav');
	await insertCertificate(who['Grace Gustav'].id, p1.id, r1, {
		state: 'retraining_due',
		expiresAt: new Date(now + 120 * DAY),
		graceUntil: new Date(now + 5 * DAY)
	});
	await person('Overdue Oskar');
	await insertCertificate(who['Overdue Oskar'].id, p1.id, r1, {
		state: 'retraining_due',
		expiresAt: new Date(now + 120 * DAY),
		graceUntil: new Date(now - DAY)
	});
	await person('Expired Eliška');
	await insertCertificate(who['Expired Eliška'].id, p1.id, r1, {
		expiresAt: new Date(now - 2 * DAY)
	});
	await person('Suspended Sun');
	await insertCertificate(who['Suspended Sun'].id, p1.id, r1, { state: 'suspended' });
	await person('Assigned Ana');
	await appDb().query(
		`INSERT INTO assignments (person_id, process_id, scope, assigned_by, assigned_at)
		 VALUES (?, ?, 'person', ?, ?)`,
		[who['Assigned Ana'].id, p1.id, admin.id, new Date()]
	);
	await person('Attempted Arjun');
	const check = await makeCheck(p1.id, admin.id);
	await submittedAttempt(who['Attempted Arjun'].id, check, p1.id, false);
	await person('Nobody Nils');
	await person('Agency Aiko', { employmentType: 'agency' });
	await insertCertificate(who['Agency Aiko'].id, p1.id, r1, {
		expiresAt: new Date(now + 80 * DAY)
	});
	// Certified, but the contract ended yesterday: the gate denies, so the board must not count them.
	await person('Ended Emil', { employmentType: 'agency', contractEndsOn: '2020-01-01' });
	await insertCertificate(who['Ended Emil'].id, p1.id, r1, { expiresAt: new Date(now + 80 * DAY) });
	await person(INJECTED);
	await insertCertificate(who[INJECTED].id, p1.id, r1, { expiresAt: new Date(now + 300 * DAY) });
	// No certificate, but a supervised run on the single station until tomorrow.
	await person('Supervised Sofía');
	await appDb().query(
		`INSERT INTO supervised_runs (person_id, station_id, supervisor_id, granted_by, reason,
		   starts_at, ends_at, created_at) VALUES (?, ?, ?, ?, 'test', ?, ?, ?)`,
		[
			who['Supervised Sofía'].id,
			single.id,
			who['Valid Vân'].id,
			admin.id,
			new Date(now - 3600_000),
			new Date(now + DAY),
			new Date()
		]
	);
	const l = await createTestPerson({ roles: ['lead'], line: 'L1' });
	lead = await signInWithPassword(l.email!, l.password);
});

afterAll(async () => {
	await retireTestPeople();
	await closeDbHelpers();
	await pool.end();
});

describe('readiness board: cells', () => {
	it('shows each certificate state as its own cell state, with days to expiry', async () => {
		const { status, body } = await board(lead, query());
		expect(status).toBe(200);
		const b = body as ReadinessBoard;
		expect(b.processes.map((p) => p.code)).toEqual([p1.code, p2.code].sort());
		const col = b.processes.findIndex((p) => p.code === p1.code);
		const cell = (name: string) => row(b, name).cells[col];
		expect(cell('Valid Vân').state).toBe('certified');
		expect(cell('Valid Vân').daysToExpiry).toBeGreaterThanOrEqual(199);
		expect(cell('Expiring Eun')).toMatchObject({ state: 'expiring', status: 'expiring' });
		expect(cell('Expiring Eun').daysToExpiry).toBeGreaterThanOrEqual(9);
		expect(cell('Expiring Eun').daysToExpiry).toBeLessThanOrEqual(10);
		expect(cell('Grace Gustav').state).toBe('grace');
		expect(cell('Grace Gustav').graceUntil).not.toBeNull();
		expect(cell('Overdue Oskar')).toMatchObject({ state: 'expired', status: 'retraining_overdue' });
		expect(cell('Expired Eliška')).toMatchObject({ state: 'expired', status: 'expired' });
		expect(cell('Suspended Sun')).toMatchObject({ state: 'suspended', status: 'suspended' });
		expect(cell('Assigned Ana').state).toBe('in_training');
		expect(cell('Attempted Arjun').state).toBe('in_training');
		expect(cell('Nobody Nils').state).toBe('none');
		// Second column: only Valid Vân holds p2.
		const other = 1 - col;
		expect(row(b, 'Valid Vân').cells[other].state).toBe('certified');
		expect(row(b, 'Expiring Eun').cells[other].state).toBe('none');
	});

	it('lists expirations in 30/60/90-day bands', async () => {
		const b = (await board(lead, query())).body as ReadinessBoard;
		const mine = (list: ReadinessBoard['expirations']['within30']) =>
			list.filter((e) => Object.values(who).some((p) => p.id === e.personId));
		expect(mine(b.expirations.within30).map((e) => e.name)).toContain('Expiring Eun');
		expect(mine(b.expirations.within60).map((e) => `${e.name} ${e.process}`)).toContain(
			`Valid Vân ${p2.code}`
		);
		expect(mine(b.expirations.within90).map((e) => e.name)).toContain('Agency Aiko');
		expect(mine(b.expirations.within30).map((e) => e.name)).not.toContain('Expired Eliška');
	});

	it('narrows rows to agency staff with agency=1', async () => {
		const b = (await board(lead, `${query()}&agency=1`)).body as ReadinessBoard;
		const names = b.people.map((p) => p.name);
		expect(names).toContain('Agency Aiko');
		expect(names).not.toContain('Valid Vân');
		expect(b.people.every((p) => p.agency)).toBe(true);
	});
});

describe('readiness board: coverage agrees with the station gate', () => {
	it('counts the people the gate allows, station by station', async () => {
		const b = (await board(lead, query())).body as ReadinessBoard;
		const actor = { id: admin.id, label: admin.displayName };
		for (const st of [single, double]) {
			const { key } = await createApiKey(actor, {
				name: `readiness ${st.code}`,
				scope: 'gate',
				stationId: st.id
			});
			const allowedByGate: number[] = [];
			for (const p of Object.values(who)) {
				const res = await fetch(`${APP_URL}/api/v1/gate/checks`, {
					method: 'POST',
					headers: { 'content-type': 'application/json', authorization: `Bearer ${key}` },
					body: JSON.stringify({ station: st.code, badge: p.badge })
				});
				expect(res.status).toBe(200);
				if ((await res.json()).decision === 'allow') allowedByGate.push(p.id);
			}
			const cov = b.coverage.find((c) => c.station === st.code && c.shift === 'A')!;
			expect(cov).toBeDefined();
			// The demo crew of shift A holds none of these fresh processes, so the board's count is ours.
			expect(cov.count).toBe(allowedByGate.length);
			expect(cov.runners.map((r) => r.id).sort()).toEqual(allowedByGate.sort());
		}
		const one = b.coverage.find((c) => c.station === single.code)!;
		// Valid, expiring, grace, agency, injected name, supervised: six; not the ended contract.
		expect(one.count).toBe(6);
		expect(one.runners.find((r) => r.id === who['Supervised Sofía'].id)?.supervised).toBe(true);
		expect(one.runners.some((r) => r.id === who['Ended Emil'].id)).toBe(false);
	});

	it('flags a station below its minimum and not one at it', async () => {
		const b = (await board(lead, query())).body as ReadinessBoard;
		const one = b.coverage.find((c) => c.station === single.code)!;
		const two = b.coverage.find((c) => c.station === double.code)!;
		expect(one).toMatchObject({ minQualified: 3, below: false });
		expect(two).toMatchObject({ minQualified: 2, count: 1, below: true });
	});
});

describe('readiness board: CSV export', () => {
	it('parses back, starts with a BOM and neutralises a formula in a name', async () => {
		const res = await lead.get(`/api/v1/readiness.csv?${query()}`);
		expect(res.status).toBe(200);
		expect(res.headers.get('content-type')).toMatch(/^text\/csv/);
		const bytes = new Uint8Array(await res.arrayBuffer());
		expect([...bytes.slice(0, 3)]).toEqual([0xef, 0xbb, 0xbf]);
		const rows = parseCsv(new TextDecoder().decode(bytes).replace(/^\uFEFF/, ''));
		const [header, ...data] = rows;
		expect(header.slice(0, 4)).toEqual(['name', 'employee_no', 'shift', 'agency']);
		const col = header.indexOf(p1.code);
		expect(col).toBeGreaterThan(0);
		const byNo = new Map(data.map((r) => [r[1], r]));
		expect(byNo.get(who['Valid Vân'].employeeNo)![col]).toBe('Certified');
		expect(byNo.get(who['Expiring Eun'].employeeNo)![col]).toMatch(/^Expiring \d+ d$/);
		const injected = byNo.get(who[INJECTED].employeeNo)!;
		expect(injected[0]).toBe(`'${INJECTED}`);
		expect(data.every((r) => r.length === header.length)).toBe(true);
		// `?format=csv` is the same export.
		const again = await lead.get(`/api/v1/readiness?${query()}&format=csv`);
		expect(again.headers.get('content-type')).toMatch(/^text\/csv/);
		const [audit] = await queryRows<{ n: number }>(
			appDb(),
			"SELECT COUNT(*) AS n FROM audit_events WHERE action = 'readiness.export'"
		);
		expect(Number(audit.n)).toBeGreaterThanOrEqual(2);
	});
});

describe('readiness board: refusals', () => {
	it('answers 403 to roles other than lead, quality and admin', async () => {
		for (const role of ['operator', 'trainer', 'hr'] as const) {
			const client = await signInAsDemo(role);
			const res = await client.get('/api/v1/readiness?line=L1', {
				headers: { accept: 'application/json' }
			});
			expect(res.status).toBe(403);
			expect((await res.json()).error).toMatch(/roles/);
			expect((await client.get('/api/v1/readiness.csv?line=L1')).status).toBe(403);
		}
		expect((await fetch(`${APP_URL}/api/v1/readiness?line=L1`)).status).toBe(401);
	});

	it('answers 400 with fields for a bad query and 404 for an unknown line', async () => {
		const bad = await board(lead, 'line=L1&agency=maybe&shift=%3Cscript%3E');
		expect(bad.status).toBe(400);
		expect(bad.body.error).toBeTruthy();
		expect(Object.keys(bad.body.fields).sort()).toEqual(['agency', 'shift']);
		const unknownShift = await board(lead, 'line=L1&shift=Z&process=NOPE-X');
		expect(unknownShift.status).toBe(400);
		expect(Object.keys(unknownShift.body.fields).sort()).toEqual(['process', 'shift']);
		const quality = await signInAsDemo('quality');
		expect((await board(quality, 'line=L9')).status).toBe(404);
		// A lead reaches only their own line: another line answers like an unknown one.
		expect((await board(lead, 'line=L2')).status).toBe(404);
		expect((await board(quality, 'line=L2')).status).toBe(200);
	});
});
