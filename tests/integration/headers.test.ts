// Security headers, cookie flags, cross-site request refusal, error pages and the health check, as
// the built server answers them.
import { describe, expect, it, vi } from 'vitest';
import { appDb, createTestPerson, queryRows } from '../helpers/db';
import { APP_URL, newClient, postPasswordSignIn, SESSION_COOKIE } from '../helpers/http-session';
import { useDemoSession } from '../helpers/lifecycle';
import { cspDirectives } from '../helpers/response-checks';

const EVIL = 'https://evil.example';
const admin = useDemoSession('admin');

/** The directives of a response's Content-Security-Policy header, by name. */
function csp(res: Response): Map<string, string[]> {
	const header = res.headers.get('content-security-policy');
	expect(header, 'Content-Security-Policy header').toBeTruthy();
	return cspDirectives(header!);
}

function expectCommonHeaders(res: Response) {
	expect(res.headers.get('x-content-type-options')).toBe('nosniff');
	expect(res.headers.get('referrer-policy')).toBe('strict-origin-when-cross-origin');
	expect(csp(res).get('frame-ancestors')).toEqual(["'none'"]);
}

function expectPageCsp(res: Response, html: string) {
	const policy = csp(res);
	const scripts = policy.get('script-src') ?? policy.get('default-src')!;
	expect(scripts).not.toContain("'unsafe-inline'");
	expect(scripts).not.toContain("'unsafe-eval'");
	const nonce = scripts.find((s) => s.startsWith("'nonce-"));
	expect(nonce, 'script-src carries a nonce').toBeTruthy();
	// Every inline script in the page carries that nonce; nothing else would run.
	const value = nonce!.slice("'nonce-".length, -1);
	const inline = [...html.matchAll(/<script(?![^>]*\bsrc=)([^>]*)>/g)];
	expect(inline.length).toBeGreaterThan(0);
	for (const m of inline) expect(m[1]).toContain(`nonce="${value}"`);
	expect(policy.get('object-src')).toEqual(["'none'"]);
}

describe('security headers', () => {
	it('on a signed-in page: CSP with a nonce, nosniff, no framing, no caching', async () => {
		const res = await admin.client.get('/');
		expect(res.status).toBe(200);
		const html = await res.text();
		expectCommonHeaders(res);
		expectPageCsp(res, html);
		expect(res.headers.get('cache-control')).toBe('no-store');
	});

	it('with a fresh nonce on every response', async () => {
		const nonces = await Promise.all(
			[1, 2].map(async () => {
				const res = await admin.client.get('/');
				await res.body?.cancel();
				return csp(res)
					.get('script-src')!
					.find((s) => s.startsWith("'nonce-"));
			})
		);
		expect(nonces[0]).not.toBe(nonces[1]);
	});

	it('on the sign-in page', async () => {
		const res = await newClient().get('/signin');
		expect(res.status).toBe(200);
		expectCommonHeaders(res);
		expectPageCsp(res, await res.text());
	});

	it('on an API response', async () => {
		const res = await newClient().get('/api/health', { headers: { accept: 'application/json' } });
		expectCommonHeaders(res);
		expect(csp(res).get('default-src')).toEqual(["'none'"]);
		expect(res.headers.get('cache-control')).toBe('no-store');
		await res.body?.cancel();
	});

	it('on an API response to someone signed in, also no caching', async () => {
		const res = await admin.client.get('/api/health', { headers: { accept: 'application/json' } });
		expect(res.headers.get('cache-control')).toBe('no-store');
		await res.body?.cancel();
	});
});

describe('Auth.js answers', () => {
	it('carry the security headers too', async () => {
		const res = await newClient().get('/auth/providers', {
			headers: { accept: 'application/json' }
		});
		await res.body?.cancel();
		expectCommonHeaders(res);
	});
});

describe('the session cookie', () => {
	it('is HttpOnly and SameSite=Lax, for the whole site', async () => {
		const p = await createTestPerson({ roles: ['operator'] });
		const res = await postPasswordSignIn(newClient(), p.email!, p.password);
		expect(res.status).toBe(303);
		const cookie = res.headers.getSetCookie().find((c) => c.startsWith(`${SESSION_COOKIE}=`));
		expect(cookie).toBeTruthy();
		const attrs = cookie!.split(';').map((a) => a.trim().toLowerCase());
		expect(attrs).toContain('httponly');
		expect(attrs).toContain('samesite=lax');
		expect(attrs).toContain('path=/');
	});
});

describe('cross-site requests', () => {
	it('refuses a form post from another origin, even with a valid session cookie', async () => {
		const employeeNo = `X-${Date.now().toString(36).toUpperCase()}`;
		const res = await admin.client.postForm(
			'/admin/people/new?/save',
			{
				employeeNo,
				displayName: 'Planted by another site',
				badgeNo: `${employeeNo}-B`,
				roles: ['admin']
			},
			{ headers: { origin: EVIL } }
		);
		expect(res.status).toBe(403);
		await res.body?.cancel();
		const rows = await queryRows(appDb(), 'SELECT id FROM people WHERE employee_no = ?', [
			employeeNo
		]);
		expect(rows).toEqual([]);
	});

	it('refuses a cross-site sign-in post', async () => {
		const res = await newClient().postForm(
			'/signin?/password',
			{ email: 'admin@kbo2.example', password: 'kestrel-bay-demo-2026' },
			{ headers: { origin: EVIL } }
		);
		expect(res.status).toBe(403);
		expect(res.headers.getSetCookie().some((c) => c.startsWith(SESSION_COOKIE))).toBe(false);
		await res.body?.cancel();
	});

	it('refuses a cookie-authenticated API call from another origin with JSON', async () => {
		const res = await admin.client.post('/api/health', '{}', {
			headers: { origin: EVIL, 'content-type': 'application/json', accept: 'application/json' }
		});
		expect(res.status).toBe(403);
		expect(res.headers.get('content-type')).toContain('application/json');
		expect(await res.json()).toEqual({ error: 'Cross-site request refused.' });
		// The refusal is answered by a hook without resolving; the headers hook still covers it.
		expectCommonHeaders(res);
		expect(res.headers.get('cache-control')).toBe('no-store');
	});

	it('refuses JSON posted to a form action from another origin (SvelteKit checks forms only)', async () => {
		const res = await admin.client.post('/admin/people/new?/save', '{"displayName":"x"}', {
			headers: { origin: EVIL, 'content-type': 'application/json' }
		});
		expect(res.status).toBe(403);
		expect(await res.text()).toBe('Cross-site request refused.');
		expectCommonHeaders(res);
	});

	it('refuses it without an Origin header when the browser says it is cross-site', async () => {
		const res = await admin.client.post('/api/health', '{}', {
			headers: {
				origin: '',
				'sec-fetch-site': 'cross-site',
				'content-type': 'application/json',
				accept: 'application/json'
			}
		});
		expect(res.status).toBe(403);
		await res.body?.cancel();
	});

	it('lets the same call through from the app itself (and the route then answers)', async () => {
		const res = await admin.client.post('/api/health', '{}', {
			headers: { 'content-type': 'application/json', accept: 'application/json' }
		});
		// /api/health has no POST handler: 405 shows the Origin check did not stop it.
		expect(res.status).toBe(405);
		await res.body?.cancel();
	});
});

describe('error pages', () => {
	it('answer a malformed address with the error page: a reference id, no stack trace', async () => {
		const res = await admin.client.get('/admin/people/%E0%A4%A');
		expect(res.status).toBe(400);
		const html = await res.text();
		const id = /Reference for the help desk: <span[^>]*>([0-9a-f]{8})</.exec(html)?.[1];
		expect(id, 'reference id on the page').toBeTruthy();
		expect(html).not.toMatch(/\bat [\w.<>]+ \(|node_modules|\.js:\d+:\d+|SvelteKitError/);
		expectCommonHeaders(res);
	});

	it('give unexpected errors an id, a plain message, and the details only in the server log', async () => {
		const { handleError } = await import('../../src/hooks.server');
		const logged = vi.spyOn(console, 'error').mockImplementation(() => {});
		try {
			const event = { request: new Request(`${APP_URL}/x`), url: new URL(`${APP_URL}/x`) };
			const detail = new Error('connection to 10.0.0.5 refused for user padbridge_app');
			const out = await handleError({
				error: detail,
				event: event as never,
				status: 500,
				message: 'Internal Error'
			});
			expect(out).toEqual({ message: 'Something went wrong on our side.', id: expect.any(String) });
			const id = (out as { id: string }).id;
			expect(id).toMatch(/^[0-9a-f]{8}$/);
			expect(logged).toHaveBeenCalledWith(expect.stringContaining(`[error ${id}]`), detail);
		} finally {
			logged.mockRestore();
		}
	});

	it('answer a malformed id with a 404 page before any database work', async () => {
		for (const path of [
			'/admin/people/abc',
			'/admin/people/0',
			'/admin/people/-1',
			'/admin/people/1e3'
		]) {
			const res = await admin.client.get(path);
			expect(res.status, path).toBe(404);
			expect(await res.text(), path).toContain('This page does not exist');
		}
	});

	it('answer an id that matches no one with a 404 page too', async () => {
		const res = await admin.client.get('/admin/people/9999999999999999');
		expect(res.status).toBe(404);
		expect(await res.text()).toContain('No such person');
	});
});

describe('GET /api/health', () => {
	it('reports the database as up', async () => {
		const res = await newClient().get('/api/health', { headers: { accept: 'application/json' } });
		expect(res.status).toBe(200);
		const body = await res.json();
		expect(body).toMatchObject({ status: 'ok', database: { up: true } });
		expect(typeof body.database.latencyMs).toBe('number');
	});
});
