// A tiny cookie-keeping HTTP client for the built app that `npm test` serves at TEST_APP_URL.
// Requests look like a browser's plain form posts: same Origin, `Accept: text/html`, and redirects
// are not followed, so tests see the 303s and Set-Cookie headers themselves.
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from '../../scripts/demo-accounts.js';
import type { Role } from '../../src/lib/roles';

export const APP_URL = process.env.TEST_APP_URL ?? 'http://127.0.0.1:3100';

/** The session cookie Auth.js sets over plain http (https would use the __Secure- prefix). */
export const SESSION_COOKIE = 'authjs.session-token';

export type FormFields = Record<string, string | number | boolean | (string | number)[]>;

export interface HttpClient {
	/** Cookies held now, by name. */
	readonly cookies: Map<string, string>;
	get(path: string, init?: RequestInit): Promise<Response>;
	post(path: string, body?: BodyInit, init?: RequestInit): Promise<Response>;
	/** A urlencoded form post, as a browser without JavaScript sends it. Arrays repeat the name. */
	postForm(path: string, fields: FormFields, init?: RequestInit): Promise<Response>;
	/** A copy holding the same cookies now (later changes are not shared). */
	clone(): HttpClient;
}

export function formBody(fields: FormFields): URLSearchParams {
	const body = new URLSearchParams();
	for (const [k, v] of Object.entries(fields)) {
		for (const item of Array.isArray(v) ? v : [v]) body.append(k, String(item));
	}
	return body;
}

function storeCookies(jar: Map<string, string>, res: Response) {
	for (const line of res.headers.getSetCookie()) {
		const [pair, ...attrs] = line.split(';');
		const eq = pair.indexOf('=');
		const name = pair.slice(0, eq).trim();
		const value = pair.slice(eq + 1).trim();
		const expired = attrs.some((a) => {
			const [k, v] = a.trim().split('=');
			if (k.toLowerCase() === 'max-age') return Number(v) <= 0;
			if (k.toLowerCase() === 'expires') return new Date(v).getTime() <= Date.now();
			return false;
		});
		if (expired || value === '') jar.delete(name);
		else jar.set(name, value);
	}
}

export function newClient(initial?: Map<string, string>): HttpClient {
	const cookies = new Map(initial ?? []);
	async function send(path: string, init: RequestInit = {}): Promise<Response> {
		const headers = new Headers(init.headers);
		if (!headers.has('origin')) headers.set('origin', APP_URL);
		if (!headers.has('accept')) headers.set('accept', 'text/html');
		if (cookies.size && !headers.has('cookie')) {
			headers.set('cookie', [...cookies].map(([k, v]) => `${k}=${v}`).join('; '));
		}
		const res = await fetch(new URL(path, APP_URL), { redirect: 'manual', ...init, headers });
		storeCookies(cookies, res);
		return res;
	}
	const client: HttpClient = {
		cookies,
		get: (path, init) => send(path, { ...init, method: 'GET' }),
		post: (path, body, init) => send(path, { ...init, method: 'POST', body }),
		postForm: (path, fields, init) =>
			send(path, { ...init, method: 'POST', body: formBody(fields) }),
		clone: () => newClient(cookies)
	};
	return client;
}

/** Posts the sign-in form's e-mail + password action; the response is returned as it came. */
export function postPasswordSignIn(client: HttpClient, email: string, password: string) {
	return client.postForm('/signin?/password', { email, password, redirectTo: '/' });
}

/** Posts the sign-in form's badge + PIN action; the response is returned as it came. */
export function postBadgeSignIn(client: HttpClient, badge: string, pin: string) {
	return client.postForm('/signin?/badge', { badge, pin, redirectTo: '/' });
}

async function expectSignedIn(client: HttpClient, res: Response, who: string) {
	if (res.status !== 303 || !client.cookies.has(SESSION_COOKIE)) {
		const text = await res.text();
		throw new Error(`sign-in as ${who} failed: HTTP ${res.status} ${text.slice(0, 300)}`);
	}
	await res.body?.cancel();
	return client;
}

export async function signInWithPassword(email: string, password: string): Promise<HttpClient> {
	const client = newClient();
	return expectSignedIn(client, await postPasswordSignIn(client, email, password), email);
}

export async function signInWithBadge(badge: string, pin: string): Promise<HttpClient> {
	const client = newClient();
	return expectSignedIn(client, await postBadgeSignIn(client, badge, pin), `badge ${badge}`);
}

/** Signs in as the demo account of a role (scripts/demo-accounts.js): badge + PIN for operators. */
export function signInAsDemo(role: Role): Promise<HttpClient> {
	const account = DEMO_ACCOUNTS.find((a) => a.role === role);
	if (!account) throw new Error(`no demo account for ${role}`);
	return account.email
		? signInWithPassword(account.email, DEMO_PASSWORD)
		: signInWithBadge(account.badge!, account.pin!);
}

/** The text of the sign-in form's message box (the same words for every refusal of one kind). */
export function signInMessage(html: string): string | null {
	const m = /Not signed in<\/p>\s*<div[^>]*>(?:<!---->)?([^<]*)/.exec(html);
	return m ? m[1].trim() : null;
}

/** Signs in with e-mail and password and returns just the `authjs.session-token=...` cookie pair. */
export async function sessionCookie(email: string, password: string): Promise<string> {
	const client = await signInWithPassword(email, password);
	const value = client.cookies.get(SESSION_COOKIE);
	if (!value) throw new Error(`Sign-in as ${email} gave no session cookie`);
	return `${SESSION_COOKIE}=${value}`;
}
