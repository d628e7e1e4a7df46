// Failed sign-ins are throttled per account and per address, with one message for unknown and known
// accounts. Every test here signs in from 127.0.0.1 (the test server's only client address) or,
// for the per-address limit, calls the sign-in check directly with made-up addresses.
import { randomBytes } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { attemptSignIn } from '../../src/lib/server/auth/signin';
import { config } from '../../src/lib/server/config';
import { pool } from '../../src/lib/server/db';
import {
	closeDbHelpers,
	createTestPerson,
	ownerDb,
	queryRows,
	retireTestPeople,
	type TestPerson
} from '../helpers/db';
import {
	newClient,
	postBadgeSignIn,
	postPasswordSignIn,
	SESSION_COOKIE,
	signInMessage
} from '../helpers/http-session';

const FAILED = 'That did not match. Check and try again.';
const THROTTLED = 'Too many failed tries. Wait 15 minutes, or ask your line lead or an admin.';

let started: Date;
let person: TestPerson;

beforeAll(async () => {
	started = new Date(Date.now() - 1000);
	person = await createTestPerson({ roles: ['operator'] });
});

afterAll(async () => {
	// Forget every failure this file caused, so later sign-ins from 127.0.0.1 are not throttled.
	await ownerDb().query('DELETE FROM sign_in_failures WHERE `at` >= ?', [started]);
	await retireTestPeople();
	await closeDbHelpers();
	await pool.end();
});

async function failures(keyType: 'account' | 'address', keyValue: string) {
	const [row] = await queryRows<{ n: number }>(
		ownerDb(),
		'SELECT COUNT(*) AS n FROM sign_in_failures WHERE key_type = ? AND key_value = ? AND `at` >= ?',
		[keyType, keyValue, started]
	);
	return Number(row.n);
}

describe('throttling failed sign-ins', () => {
	it('uses the documented defaults: 10 per account, 50 per address, 15 minutes', () => {
		expect(config.throttle).toEqual({ windowMinutes: 15, perAccount: 10, perAddress: 50 });
	});

	it('refuses the 11th try for an account, even with the right password, with HTTP 429', async () => {
		const client = newClient();
		for (let i = 1; i <= config.throttle.perAccount; i++) {
			const res = await postPasswordSignIn(client, person.email!, `wrong-password-${i}`);
			expect(res.status, `try ${i}`).toBe(400);
			expect(signInMessage(await res.text()), `try ${i}`).toBe(FAILED);
		}
		expect(await failures('account', `password:${person.email}`)).toBe(config.throttle.perAccount);

		const res = await postPasswordSignIn(client, person.email!, person.password);
		expect(res.status).toBe(429);
		const html = await res.text();
		expect(signInMessage(html)).toBe(THROTTLED);
		expect(client.cookies.has(SESSION_COOKIE)).toBe(false);
		// A refused try is not checked, so it is not counted as one more failure either.
		expect(await failures('account', `password:${person.email}`)).toBe(config.throttle.perAccount);
	});

	it('throttles the account name however it is capitalised', async () => {
		const res = await postPasswordSignIn(newClient(), person.email!.toUpperCase(), 'x');
		expect(res.status).toBe(429);
		expect(signInMessage(await res.text())).toBe(THROTTLED);
	});

	it('keeps the badge + PIN sign-in of the same person separate', async () => {
		const client = newClient();
		const res = await postBadgeSignIn(client, person.badge!, person.pin);
		expect(res.status).toBe(303);
		expect(client.cookies.has(SESSION_COOKIE)).toBe(true);
	});

	it('answers an unknown account exactly like a known one with a wrong password', async () => {
		const other = await createTestPerson({ roles: ['quality'] });
		const known = await postPasswordSignIn(newClient(), other.email!, 'not-the-password');
		const unknownEmail = `nobody-${randomBytes(4).toString('hex')}@kbo2.example`;
		const unknown = await postPasswordSignIn(newClient(), unknownEmail, 'not-the-password');
		expect(unknown.status).toBe(known.status);
		expect(known.status).toBe(400);
		// Each page carries its own CSP nonce; everything else must match.
		const strip = (html: string) => html.replace(/nonce="[^"]*"/g, 'nonce=""');
		const [k, u] = [strip(await known.text()), strip(await unknown.text())];
		expect(signInMessage(u)).toBe(FAILED);
		expect(signInMessage(k)).toBe(FAILED);
		// Apart from the typed address itself, the two pages are the same page.
		expect(u.replaceAll(unknownEmail, 'EMAIL')).toBe(k.replaceAll(other.email!, 'EMAIL'));
		// Unknown accounts count too, so guessing names is throttled as well.
		expect(await failures('account', `password:${unknownEmail}`)).toBe(1);
	});

	it('answers a deactivated person like an unknown account', async () => {
		const gone = await createTestPerson({ roles: ['operator'], active: false });
		const res = await postPasswordSignIn(newClient(), gone.email!, gone.password);
		expect(res.status).toBe(400);
		expect(signInMessage(await res.text())).toBe(FAILED);
	});

	it('forgives the account after a successful sign-in', async () => {
		const p = await createTestPerson({ roles: ['operator'] });
		for (let i = 0; i < 3; i++) await postPasswordSignIn(newClient(), p.email!, 'wrong');
		expect(await failures('account', `password:${p.email}`)).toBe(3);
		const res = await postPasswordSignIn(newClient(), p.email!, p.password);
		expect(res.status).toBe(303);
		expect(await failures('account', `password:${p.email}`)).toBe(0);
	});

	it('refuses an address after 50 failures across many accounts, but not other addresses', async () => {
		// The sign-in check itself, with documentation addresses (RFC 3849) as the clients.
		const tag = randomBytes(2).toString('hex');
		const noisy = `2001:db8::${tag}:1`;
		const quiet = `2001:db8::${tag}:2`;
		const target = await createTestPerson({ roles: ['operator'] });
		const batch = 10;
		for (let i = 0; i < config.throttle.perAddress; i += batch) {
			const results = await Promise.all(
				Array.from({ length: batch }, (_, j) =>
					attemptSignIn('password', `guess-${tag}-${i + j}@kbo2.example`, 'guess', noisy)
				)
			);
			for (const r of results) expect(r).toEqual({ ok: false, reason: 'invalid' });
		}
		expect(await failures('address', noisy)).toBe(config.throttle.perAddress);

		// Each guessed account failed only once; the address limit is what now refuses.
		expect(await attemptSignIn('password', target.email!, target.password, noisy)).toEqual({
			ok: false,
			reason: 'throttled'
		});
		const elsewhere = await attemptSignIn('password', target.email!, target.password, quiet);
		expect(elsewhere.ok).toBe(true);
	});

	it('lets no more than 10 tries through when they arrive all at once', async () => {
		const p = await createTestPerson({ roles: ['operator'] });
		const tag = randomBytes(2).toString('hex');
		const results = await Promise.all(
			Array.from({ length: 30 }, (_, i) =>
				attemptSignIn('password', p.email!, `wrong-${i}`, `2001:db8:1::${tag}:${i}`)
			)
		);
		const checked = results.filter((r) => !r.ok && r.reason === 'invalid').length;
		const refused = results.filter((r) => !r.ok && r.reason === 'throttled').length;
		expect(checked).toBe(config.throttle.perAccount);
		expect(refused).toBe(30 - config.throttle.perAccount);
		expect(await failures('account', `password:${p.email}`)).toBe(config.throttle.perAccount);
	});

	it('lets the window pass: failures older than 15 minutes do not count', async () => {
		const p = await createTestPerson({ roles: ['operator'] });
		const account = `password:${p.email}`;
		const old = new Date(Date.now() - (config.throttle.windowMinutes + 1) * 60_000);
		await ownerDb().query('INSERT INTO sign_in_failures (key_type, key_value, `at`) VALUES ?', [
			Array.from({ length: config.throttle.perAccount }, () => ['account', account, old])
		]);
		const res = await postPasswordSignIn(newClient(), p.email!, p.password);
		expect(res.status).toBe(303);
		await ownerDb().query('DELETE FROM sign_in_failures WHERE key_value = ?', [account]);
	});
});
