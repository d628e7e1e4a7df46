// A plant may serve Padbridge over plain http on its own network (http://padbridge.plant.test).
// There every cookie must come without Secure, or the browser drops it: the refreshed session
// cookie most of all, or a busy person's session ends at its first expiry. A second built server
// (`node build`) runs on the test database with that public address, so SvelteKit's localhost
// exception does not apply.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { appUrl, closeDbHelpers, createTestPerson, retireTestPeople } from '../helpers/db';
import { APP_URL, SESSION_COOKIE } from '../helpers/http-session';
import { startBuiltApp, type BuiltApp } from '../../bench/records/server';

const port = Number(new URL(APP_URL).port) + 8;
const origin = `http://padbridge.plant.test:${port}`;
let app: BuiltApp | null = null;

beforeAll(async () => {
	app = await startBuiltApp(port, appUrl(), { ...process.env }, origin);
}, 60_000);

afterAll(async () => {
	await app?.stop();
	await retireTestPeople();
	await closeDbHelpers();
});

const attrs = (line: string) =>
	line
		.split(';')
		.slice(1)
		.map((a) => a.trim().split('=')[0].toLowerCase());

describe('over plain http on a plant host name', () => {
	it('sets the session cookie without Secure at sign-in and on every refresh', async () => {
		const p = await createTestPerson({ roles: ['operator'] });
		const signIn = await fetch(`${app!.url}/signin?/password`, {
			method: 'POST',
			redirect: 'manual',
			headers: {
				origin,
				accept: 'text/html',
				'content-type': 'application/x-www-form-urlencoded'
			},
			body: new URLSearchParams({ email: p.email!, password: p.password, redirectTo: '/' })
		});
		await signIn.arrayBuffer();
		expect(signIn.status).toBe(303);
		const first = signIn.headers.getSetCookie().find((c) => c.startsWith(`${SESSION_COOKIE}=`));
		expect(first, 'session cookie at sign-in').toBeDefined();
		expect(attrs(first!)).not.toContain('secure');
		expect(attrs(first!)).toContain('httponly');

		const cookie = first!.split(';')[0];
		const home = await fetch(`${app!.url}/`, { headers: { cookie }, redirect: 'manual' });
		await home.arrayBuffer();
		expect(home.status).toBe(200);
		const refreshed = home.headers.getSetCookie().find((c) => c.startsWith(`${SESSION_COOKIE}=`));
		expect(refreshed, 'session cookie refreshed on a page view').toBeDefined();
		expect(attrs(refreshed!)).not.toContain('secure');
		expect(attrs(refreshed!)).toEqual(expect.arrayContaining(['httponly', 'samesite', 'path']));
	});
});
