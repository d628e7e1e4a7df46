import { json, text, type Handle, type HandleServerError, type ServerInit } from '@sveltejs/kit';
import { sequence } from '@sveltejs/kit/hooks';
import { randomUUID } from 'node:crypto';
import { handle as authHandle } from '$lib/server/auth/authjs';
import { loadSessionUser } from '$lib/server/auth/sessions';
import { ensureBootstrapAdmin } from '$lib/server/people';
import { startScheduler, stopScheduler } from '$lib/server/jobs/scheduler';
import { pool } from '$lib/server/db';
import { config } from '$lib/server/config';

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

export const handle = sequence(headers, cookieDefaults, authHandle, user, crossSite);

export const handleError: HandleServerError = ({ error, event, status, message }) => {
	if (status === 404) return { message: 'Not found' };
	const id = randomUUID().slice(0, 8);
	console.error(`[error ${id}] ${event.request.method} ${event.url.pathname}`, error);
	return { message: status >= 500 ? 'Something went wrong on our side.' : message, id };
};
