// The station kiosk page against the built server, as a terminal without JavaScript uses it: form
// posts, a pairing cookie, and the gate's answer in the page. Decisions land in gate_checks with
// source 'kiosk'.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import {
	appDb,
	closeDbHelpers,
	createTestPerson,
	queryRows,
	retireTestPeople,
	type TestPerson
} from '../helpers/db';
import { newClient, type HttpClient } from '../helpers/http-session';
import {
	insertCertificate,
	makeProcess,
	makeRule,
	makeStation
} from '../helpers/training-fixtures';
import { createApiKey, revokeApiKey } from '../../src/lib/server/apikeys';
import { pool } from '../../src/lib/server/db';

const KIOSK_COOKIE = 'pb_kiosk_key';
let admin: TestPerson;
let operator: TestPerson;
let station: { id: number; code: string };
let other: { id: number; code: string };
let stationKey: { id: number; key: string };
let otherKey: string;

const kiosk = (code: string) => `/stations/${code}/gate`;
/** The page's text without tags, to read what a person would read. */
const textOf = async (res: Response) =>
	(await res.text())
		.replace(/<script[\s\S]*?<\/script>/g, '')
		.replace(/<[^>]+>/g, ' ')
		.replace(/\s+/g, ' ');

async function paired(): Promise<HttpClient> {
	const client = newClient();
	const res = await client.postForm(`${kiosk(station.code)}?/pair`, { key: stationKey.key });
	expect(res.status).toBe(303);
	expect(res.headers.get('location')).toBe(kiosk(station.code));
	return client;
}

beforeAll(async () => {
	admin = await createTestPerson({ roles: ['admin'] });
	operator = await createTestPerson({ roles: ['operator'], withEmail: false });
	const proc = await makeProcess();
	const ruleId = await makeRule({ processId: proc.id, createdBy: admin.id, instructionIds: [] });
	station = await makeStation([proc.id]);
	other = await makeStation([proc.id]);
	await insertCertificate(operator.id, proc.id, ruleId, {
		expiresAt: new Date(Date.now() + 200 * 86_400_000)
	});
	const actor = { id: admin.id, label: admin.displayName };
	stationKey = await createApiKey(actor, { name: 'kiosk', scope: 'gate', stationId: station.id });
	otherKey = (await createApiKey(actor, { name: 'other', scope: 'gate', stationId: other.id })).key;
});
afterAll(async () => {
	await retireTestPeople();
	await closeDbHelpers();
	await pool.end();
});

describe('station kiosk: pairing', () => {
	it('an unpaired terminal asks for pairing and offers no scan', async () => {
		const res = await newClient().get(kiosk(station.code));
		expect(res.status).toBe(200);
		expect(res.headers.get('cache-control')).toBe('no-store');
		const text = await textOf(res);
		expect(text).toContain('Pair this terminal');
		expect(text).toContain(station.code);
		expect(text).not.toContain('Scan your badge');
	});

	it('refuses the key of another station, an unbound key and nonsense, and sets no cookie', async () => {
		const client = newClient();
		const res = await client.postForm(`${kiosk(station.code)}?/pair`, { key: otherKey });
		expect(res.status).toBe(403);
		expect(await textOf(res)).toContain(
			`This key belongs to another station; it cannot pair ${station.code}`
		);
		expect(client.cookies.has(KIOSK_COOKIE)).toBe(false);

		const unbound = await createApiKey(
			{ id: admin.id, label: admin.displayName },
			{ name: 'MES', scope: 'gate' }
		);
		const r2 = await client.postForm(`${kiosk(station.code)}?/pair`, { key: unbound.key });
		expect(r2.status).toBe(400);
		expect(await textOf(r2)).toContain('not bound to a station');
		const r3 = await client.postForm(`${kiosk(station.code)}?/pair`, { key: 'pbk_nonsense' });
		expect(r3.status).toBe(400);
		expect(await textOf(r3)).toContain('not a live station gate key');
		const r4 = await client.postForm(`${kiosk(station.code)}?/pair`, { key: '' });
		expect(r4.status).toBe(400);
		expect(client.cookies.has(KIOSK_COOKIE)).toBe(false);
	});

	it('pairs with the station’s own key in an httpOnly, SameSite=Strict cookie on the kiosk path', async () => {
		const client = newClient();
		const res = await client.postForm(`${kiosk(station.code)}?/pair`, { key: stationKey.key });
		expect(res.status).toBe(303);
		const cookie = res.headers.getSetCookie().find((c) => c.startsWith(`${KIOSK_COOKIE}=`))!;
		expect(cookie).toMatch(/HttpOnly/i);
		expect(cookie).toMatch(/SameSite=Strict/i);
		expect(cookie).toContain(`Path=${kiosk(station.code)}`);
		// Plain http in tests; over https the cookie is Secure.
		expect(cookie).not.toMatch(/Secure/i);
		const page = await textOf(await client.get(kiosk(station.code)));
		expect(page).toContain('Scan your badge');
		expect(page).toContain('Unpair terminal');
		const audit = await queryRows<{ action: string }>(
			appDb(),
			"SELECT action FROM audit_events WHERE action = 'kiosk.paired' AND entity_id = ?",
			[String(station.id)]
		);
		expect(audit.length).toBeGreaterThan(0);

		// Unpair: the cookie goes, the page asks for pairing again.
		const out = await client.postForm(`${kiosk(station.code)}?/unpair`, {});
		expect(out.status).toBe(303);
		expect(client.cookies.has(KIOSK_COOKIE)).toBe(false);
		expect(await textOf(await client.get(kiosk(station.code)))).toContain('Pair this terminal');
	});
});

describe('station kiosk: scans', () => {
	it('a qualified badge shows ALLOW with the name, logged with source kiosk', async () => {
		const client = await paired();
		const started = new Date(Date.now() - 1000);
		const res = await client.postForm(`${kiosk(station.code)}?/check`, { badge: operator.badge! });
		expect(res.status).toBe(200);
		const text = await textOf(res);
		expect(text).toContain('ALLOW');
		expect(text).not.toContain('DENY');
		expect(text).toContain(operator.displayName);
		const rows = await queryRows<{ decision: string; source: string; api_key_id: number }>(
			appDb(),
			'SELECT decision, source, api_key_id FROM gate_checks WHERE station_id = ? AND person_id = ? AND at >= ?',
			[station.id, operator.id, started]
		);
		// Exactly one row per scan (a lazy query settled twice once logged every check twice).
		expect(rows.map((r) => [r.decision, r.source, Number(r.api_key_id)])).toEqual([
			['allow', 'kiosk', stationKey.id]
		]);
	});

	it('an unknown badge shows DENY with the reason in plain words', async () => {
		const client = await paired();
		const res = await client.postForm(`${kiosk(station.code)}?/check`, { badge: 'NOBODY-KIOSK-1' });
		const text = await textOf(res);
		expect(text).toContain('DENY');
		expect(text).toContain('Badge not known');
		const [row] = await queryRows<{ decision: string; source: string; reasons: unknown }>(
			appDb(),
			"SELECT decision, source, reasons FROM gate_checks WHERE badge = 'NOBODY-KIOSK-1' ORDER BY id DESC LIMIT 1"
		);
		expect(row.decision).toBe('deny');
		expect(row.source).toBe('kiosk');
		expect(JSON.stringify(row.reasons)).toContain('unknown_badge');
	});

	it('an empty scan is a field error; a revoked key unpairs the terminal on the next request', async () => {
		const actor = { id: admin.id, label: admin.displayName };
		const key = await createApiKey(actor, {
			name: 'soon gone',
			scope: 'gate',
			stationId: station.id
		});
		const client = newClient();
		await client.postForm(`${kiosk(station.code)}?/pair`, { key: key.key });
		const empty = await client.postForm(`${kiosk(station.code)}?/check`, { badge: '' });
		expect(empty.status).toBe(400);
		expect(await textOf(empty)).toContain('Give the badge number as scanned');

		await revokeApiKey(actor, key.id, 'test');
		const scan = await client.postForm(`${kiosk(station.code)}?/check`, { badge: operator.badge! });
		expect(scan.status).toBe(401);
		expect(await textOf(scan)).not.toContain('ALLOW');
		expect(client.cookies.has(KIOSK_COOKIE)).toBe(false);
	});
});
