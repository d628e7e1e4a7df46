// The station gate API against the real database and the built server: key handling, decisions
// and their log, and failing closed when MariaDB is slow or stopped, recovering by itself.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import mysql from 'mysql2/promise';
import {
	appDb,
	closeDbHelpers,
	createTestPerson,
	ownerUrl,
	queryRows,
	type TestPerson
} from '../helpers/db';
import { APP_URL } from '../helpers/http-session';
import {
	insertCertificate,
	makeProcess,
	makeRule,
	makeStation
} from '../helpers/training-fixtures';
import { createApiKey, revokeApiKey } from '../../src/lib/server/apikeys';
import { pool } from '../../src/lib/server/db';
import { startTestDatabase, stopTestDatabase } from '../helpers/mariadb-control';

const DAY = 86_400_000;
// The test app's gate timeout (GATE_TIMEOUT_MS, default 1500 ms) plus room for the HTTP round trip.
const FAIL_CLOSED_WITHIN_MS = 1500 + 1000;
let admin: TestPerson;
let operator: TestPerson;
let station: { id: number; code: string };
let other: { id: number; code: string };
let stationKey: string;
let otherKey: string;

async function gate(key: string | null, body: unknown, contentType = 'application/json') {
	const started = Date.now();
	const res = await fetch(`${APP_URL}/api/v1/gate/checks`, {
		method: 'POST',
		headers: {
			'content-type': contentType,
			...(key ? { authorization: `Bearer ${key}` } : {})
		},
		body: typeof body === 'string' ? body : JSON.stringify(body)
	});
	return { status: res.status, body: await res.json(), ms: Date.now() - started };
}

beforeAll(async () => {
	admin = await createTestPerson({ roles: ['admin'] });
	operator = await createTestPerson({ roles: ['operator'], withEmail: false });
	const proc = await makeProcess();
	const ruleId = await makeRule({ processId: proc.id, createdBy: admin.id, instructionIds: [] });
	station = await makeStation([proc.id]);
	other = await makeStation([proc.id]);
	await insertCertificate(operator.id, proc.id, ruleId, {
		expiresAt: new Date(Date.now() + 200 * DAY)
	});
	const actor = { id: admin.id, label: admin.displayName };
	stationKey = (
		await createApiKey(actor, { name: 'test gate', scope: 'gate', stationId: station.id })
	).key;
	otherKey = (await createApiKey(actor, { name: 'other gate', scope: 'gate', stationId: other.id }))
		.key;
});
afterAll(async () => {
	await closeDbHelpers();
	await pool.end();
});

describe('station gate API: keys', () => {
	it('answers 401 without a key, with a revoked key and with a key of another scope', async () => {
		expect((await gate(null, { station: station.code, badge: operator.badge })).status).toBe(401);
		const actor = { id: admin.id, label: admin.displayName };
		const calc = await createApiKey(actor, { name: 'calc', scope: 'calculators' });
		expect((await gate(calc.key, { station: station.code, badge: operator.badge })).status).toBe(
			401
		);
		const revoked = await createApiKey(actor, {
			name: 'gone',
			scope: 'gate',
			stationId: station.id
		});
		await revokeApiKey(actor, revoked.id, 'test');
		const r = await gate(revoked.key, { station: station.code, badge: operator.badge });
		expect(r.status).toBe(401);
		expect(r.body.error).toMatch(/API key/);
	});

	it('answers 403 to a key bound to another station', async () => {
		const r = await gate(otherKey, { station: station.code, badge: operator.badge });
		expect(r.status).toBe(403);
		expect(r.body.error).toMatch(/another station/);
	});

	it('answers 400 with field errors, 415 for a body that is not JSON', async () => {
		const r = await gate(stationKey, { station: '', badge: 42 });
		expect(r.status).toBe(400);
		expect(Object.keys(r.body.fields).sort()).toEqual(['badge', 'station']);
		expect((await gate(stationKey, '<station/>', 'application/xml')).status).toBe(415);
		expect((await gate(stationKey, '{not json')).status).toBe(400);
	});
});

describe('station gate API: decisions and their log', () => {
	it('allows a qualified badge and denies an unknown one, logging both', async () => {
		const allow = await gate(stationKey, { station: station.code, badge: operator.badge });
		expect(allow.status).toBe(200);
		expect(allow.body).toMatchObject({
			decision: 'allow',
			reasons: [],
			person: { name: operator.displayName, employeeNo: operator.employeeNo }
		});
		expect(new Date(allow.body.validUntil).getTime()).toBeGreaterThan(Date.now() + 199 * DAY);
		const deny = await gate(stationKey, { station: station.code, badge: 'NOBODY-1' });
		expect(deny.body).toMatchObject({
			decision: 'deny',
			reasons: [{ code: 'unknown_badge' }],
			person: null
		});

		const rows = await queryRows<{
			id: number;
			decision: string;
			person_id: number | null;
			reasons: unknown;
		}>(
			appDb(),
			'SELECT id, decision, person_id, reasons FROM gate_checks WHERE id IN (?, ?) ORDER BY id',
			[allow.body.checkId, deny.body.checkId]
		);
		expect(rows.map((r) => [r.decision, r.person_id == null ? null : Number(r.person_id)])).toEqual(
			[
				['allow', operator.id],
				['deny', null]
			]
		);
	});

	it('an unscoped gate key may ask for any station, and an unknown station is denied', async () => {
		const actor = { id: admin.id, label: admin.displayName };
		const mes = await createApiKey(actor, { name: 'MES', scope: 'gate' });
		const r = await gate(mes.key, { station: other.code, badge: operator.badge });
		expect(r.body.decision).toBe('allow');
		const u = await gate(mes.key, { station: 'L9-NOPE-99', badge: operator.badge });
		expect(u.body).toMatchObject({ decision: 'deny', reasons: [{ code: 'unknown_station' }] });
	});
});

describe('station gate API: fails closed', () => {
	it('denies `unavailable` within the timeout while the tables are locked, then allows again', async () => {
		const locker = await mysql.createConnection({ uri: ownerUrl() });
		try {
			await locker.query('LOCK TABLES stations WRITE');
			const r = await gate(stationKey, { station: station.code, badge: operator.badge });
			expect(r.status).toBe(503);
			expect(r.body).toMatchObject({ decision: 'deny', reasons: [{ code: 'unavailable' }] });
			expect(r.ms).toBeLessThan(FAIL_CLOSED_WITHIN_MS);
		} finally {
			await locker.query('UNLOCK TABLES');
			await locker.end();
		}
		const back = await gate(stationKey, { station: station.code, badge: operator.badge });
		expect(back.body.decision).toBe('allow');
	});

	it('denies `unavailable` while MariaDB is stopped and allows again after it restarts, without restarting the app', async () => {
		await closeDbHelpers();
		await stopTestDatabase();
		try {
			const r = await gate(stationKey, { station: station.code, badge: operator.badge });
			expect(r.status).toBe(503);
			expect(r.body).toMatchObject({ decision: 'deny', reasons: [{ code: 'unavailable' }] });
			expect(r.ms).toBeLessThan(FAIL_CLOSED_WITHIN_MS);
		} finally {
			await startTestDatabase();
		}
		let last: Awaited<ReturnType<typeof gate>> | null = null;
		for (let i = 0; i < 20; i++) {
			last = await gate(stationKey, { station: station.code, badge: operator.badge });
			if (last.body.decision === 'allow') break;
			await new Promise((r) => setTimeout(r, 500));
		}
		expect(last?.body.decision).toBe('allow');
		// The decision made while the database was away reached the log once it was back.
		const [row] = await queryRows<{ n: number }>(
			appDb(),
			"SELECT COUNT(*) AS n FROM gate_checks WHERE station_code = ? AND JSON_EXTRACT(reasons, '$[0].code') = 'unavailable'",
			[station.code]
		);
		expect(Number(row.n)).toBeGreaterThanOrEqual(2);
	});
});
