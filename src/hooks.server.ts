import { json, text, type Handle, type HandleServerError, type ServerInit } from '@sveltejs/kit';
import { sequence } from '@sveltejs/kit/hooks';
import { randomUUID } from 'node:crypto';
import { handle as authHandle } from '$lib/server/auth/authjs';
import { loadSessionUser } from '$lib/server/auth/sessions';
import { ensureBootstrapAdmin } from '$lib/server/people';
import { startScheduler, stopScheduler } from '$lib/server/jobs/scheduler';
import { pool } from '$lib/server/db';
import { config } from '$lib/server/config';
import { invalidUtf8Fields } from '$lib/server/api';
import { isBodyTooLarge } from '$lib/server/forms';

export const init: ServerInit = async () => {
	await ensureBootstrapAdmin();
	// PADBRIDGE_JOBS=off leaves scheduled work to other instances (or to tests that drive it).
	if (process.env.PADBRIDGE_JOBS !== 'off') startScheduler();
	// adapter-node emits this once the HTTP server has closed after SIGTERM or SIGINT (requests in
	// flight have finished); closing the pool lets the process exit instead of idling on it.
	process.once('sveltekit:shutdown', () => {
		stopScheduler();
		pool.end().catch((err) => console.error('closing the database pool failed', err));
	});
};

/**
 * Re-reads the signed-in person from the database on every request (revocation is immediate).
 * When that read fails (the database is down), the person counts as nobody and the failure is
 * thrown again by the route's guard: an error thrown here would get SvelteKit's bare fallback page,
 * while one thrown in a load or endpoint gets the error page with its reference id.
 */
const user: Handle = async ({ event, resolve }) => {
	const session = await event.locals.auth();
	event.locals.sessionId = session?.sid ?? null;
	event.locals.user = null;
	event.locals.userLoadError = null;
	if (session?.sid) {
		try {
			event.locals.user = await loadSessionUser(session.sid);
		} catch (err) {
			event.locals.userLoadError = err;
		}
	}
	return resolve(event);
};

const UNSAFE = new Set(['POST', 'PUT', 'PATCH', 'DELETE']);

/**
 * SvelteKit checks Origin on form-encoded posts only (before any hook). A cookie-carrying request
 * that changes state in any other encoding (JSON to the API, or to a form action, which SvelteKit
 * would answer 415) gets the same check here; calls with an API key (no cookies involved) are left
 * to the key check.
 */
const crossSite: Handle = async ({ event, resolve }) => {
	const { request, url } = event;
	if (UNSAFE.has(request.method)) {
		const usesKey = /^bearer /i.test(request.headers.get('authorization') ?? '');
		// Without cookies a request carries no ambient credentials, so there is nothing to forge;
		// it is left to the endpoint's own 401.
		const hasCookies = !!request.headers.get('cookie');
		if (!usesKey && hasCookies) {
			const origin = request.headers.get('origin');
			const site = request.headers.get('sec-fetch-site');
			const sameOrigin = origin ? origin === url.origin : site === 'same-origin';
			if (!sameOrigin) {
				const message = 'Cross-site request refused.';
				return url.pathname.startsWith('/api/') ||
					request.headers.get('accept')?.includes('application/json')
					? json({ error: message }, { status: 403 })
					: text(message, { status: 403 });
			}
		}
	}
	return resolve(event);
};

/**
 * Form and JSON bodies must be UTF-8: the parsers would turn other bytes into U+FFFD without a
 * word and the text would be stored other than it was sent. Refused before any action runs.
 */
const bodyEncoding: Handle = async ({ event, resolve }) => {
	const { request } = event;
	const type = request.headers.get('content-type') ?? '';
	const kind = /^application\/x-www-form-urlencoded\b/i.test(type)
		? 'form'
		: /^application\/json\b/i.test(type)
			? 'json'
			: null;
	if (!kind || !UNSAFE.has(request.method)) return resolve(event);
	const wantsJson =
		kind === 'json' ||
		event.url.pathname.startsWith('/api/') ||
		/application\/json/i.test(request.headers.get('accept') ?? '');
	const refuse = (status: 400 | 413, text: string, fields: Record<string, string>) =>
		wantsJson
			? json({ error: text, fields }, { status })
			: new Response(text, { status, headers: { 'content-type': 'text/plain; charset=utf-8' } });
	let bytes: Uint8Array | null = null;
	try {
		bytes = new Uint8Array(await request.clone().arrayBuffer());
	} catch (err) {
		// Over BODY_SIZE_LIMIT: adapter-node's reader throws a 413, which a form action would
		// otherwise see as an empty form and answer with "required" errors.
		if (isBodyTooLarge(err)) {
			return refuse(413, 'The request is larger than the server accepts; nothing was saved.', {});
		}
		// Anything else (a body cut off) is left to the route's own answer.
		return resolve(event);
	}
	const bad = invalidUtf8Fields(bytes, kind);
	if (!bad) return resolve(event);
	const text = `The ${bad.includes('_') ? 'request' : bad.join(', ')} was not sent as UTF-8 text; nothing was saved.`;
	return refuse(400, text, Object.fromEntries(bad.map((f) => [f, 'Not valid UTF-8 text.'])));
};

/**
 * Outermost, so that every answer gets these headers: the pages and endpoints, and also what the
 * auth hook (Auth.js's own /auth/* answers) and crossSite answer without resolving.
 */
const headers: Handle = async ({ event, resolve }) => {
	const response = mutable(await resolve(event));
	const h = response.headers;
	h.set('X-Content-Type-Options', 'nosniff');
	h.set('Referrer-Policy', 'strict-origin-when-cross-origin');
	h.set('X-Frame-Options', 'DENY');
	h.set('Permissions-Policy', 'camera=(self), microphone=(), geolocation=()');
	h.set('Cross-Origin-Opener-Policy', 'same-origin');
	if (event.url.protocol === 'https:') {
		h.set('Strict-Transport-Security', 'max-age=31536000; includeSubDomains');
	}
	if (!h.has('Content-Security-Policy')) {
		h.set('Content-Security-Policy', "default-src 'none'; frame-ancestors 'none'");
	}
	// A session cookie alone asks for no-store too: while the person cannot be read, the error
	// page still belongs to them.
	if (event.locals.user || event.locals.sessionId) h.set('Cache-Control', 'no-store');
	// Behind a balancer: which instance answered (for operators and the cluster tests).
	if (config.instanceName) h.set('X-Padbridge-Instance', config.instanceName);
	// Public certificate checks (found, unknown or rate-limited) stay out of search engines.
	if (event.url.pathname.startsWith('/verify/')) {
		h.set('X-Robots-Tag', 'noindex, nofollow');
		h.set('Cache-Control', 'no-store');
	}
	return response;
};

/**
 * Cookies are Secure exactly when the site is served over https. SvelteKit makes a cookie Secure
 * whenever the caller does not say (except on localhost), and Auth.js's session refresh does not
 * say: on a plant network served over plain http the browser would drop every refreshed session
 * cookie, so sessions would end at their first expiry however busy the person is.
 */
const cookieDefaults: Handle = async ({ event, resolve }) => {
	const secure = event.url.protocol === 'https:';
	const set = event.cookies.set.bind(event.cookies);
	event.cookies.set = (name, value, options) =>
		set(name, value, { ...options, secure: options.secure ?? secure });
	return resolve(event);
};

/** A response whose headers can be set (those of a fetched or `Response.redirect` one cannot). */
function mutable(response: Response): Response {
	try {
		response.headers.set('X-Content-Type-Options', 'nosniff');
		return response;
	} catch {
		return new Response(response.body, response);
	}
}

export const handle = sequence(headers, cookieDefaults, authHandle, user, crossSite, bodyEncoding);

export const handleError: HandleServerError = ({ error, event, status, message }) => {
	if (status === 404) return { message: 'Not found' };
	const id = randomUUID().slice(0, 8);
	console.error(`[error ${id}] ${event.request.method} ${event.url.pathname}`, error);
	return { message: status >= 500 ? 'Something went wrong on our side.' : message, id };
};
