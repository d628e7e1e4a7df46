// What every answer of the app must carry, whatever its status: the security headers of
// src/hooks.server.ts, cookies that scripts and other sites cannot use, and a body that says
// nothing about the code or the database behind it. The guard matrix runs it on every response.
import { expect } from 'vitest';
import { APP_URL } from './http-session';

/** Traces and database detail that must never reach a visitor. */
export const LEAK_PATTERNS: { name: string; re: RegExp }[] = [
	{ name: 'stack frame of an anonymous function', re: /at Object\.<anonymous>/ },
	{ name: 'stack frame', re: /^\s{2,}at .*(\(file:|\(node:internal|node:internal)/m },
	{ name: 'source position', re: /\.(ts|js|svelte):\d+:\d+/ },
	{ name: 'MariaDB error code', re: /\bER_[A-Z_]{3,}/ },
	{ name: 'SQL error text', re: /SQL syntax/i },
	{ name: 'SQL statement', re: /\bSELECT\b[^<>\n]{0,200}\bFROM\b/ },
	{ name: 'database driver', re: /mysql2/ },
	{ name: 'errno', re: /\berrno\b/ },
	{ name: 'sqlMessage', re: /sqlMessage/ }
];

/**
 * Cookies are Secure exactly when the site is served over https (the cookieDefaults hook; Auth.js
 * and the kiosk cookie decide by the protocol too). Over plain http a Secure cookie would be
 * dropped by the browser, so there it must not be Secure.
 */
const SECURE_COOKIES = new URL(APP_URL).protocol === 'https:';

export interface ResponseTally {
	responses: number;
	headers: number;
	cookies: number;
	bodies: number;
}

export function newTally(): ResponseTally {
	return { responses: 0, headers: 0, cookies: 0, bodies: 0 };
}

function isText(contentType: string): boolean {
	return /^(text\/|application\/(json|xml|javascript))/.test(contentType);
}

/** The directives of a Content-Security-Policy, by name. */
export function cspDirectives(header: string): Map<string, string[]> {
	return new Map(
		header
			.split(';')
			.map((d) => d.trim().split(/\s+/))
			.filter((parts) => parts[0])
			.map(([name, ...values]) => [name.toLowerCase(), values])
	);
}

/**
 * Checks one response (its body already read as text) and adds what it checked to `tally`.
 * `signedIn`: the request carried a session cookie, so the answer must not be cached.
 */
export function checkResponse(
	res: Response,
	body: string,
	where: string,
	signedIn: boolean,
	tally: ResponseTally
): void {
	const h = res.headers;
	const soft = (value: unknown, what: string) => expect.soft(value, `${where}: ${what}`);
	tally.responses++;

	soft(h.get('x-content-type-options'), 'X-Content-Type-Options').toBe('nosniff');
	soft(
		['no-referrer', 'same-origin', 'strict-origin', 'strict-origin-when-cross-origin'],
		'Referrer-Policy'
	).toContain(h.get('referrer-policy'));
	const csp = cspDirectives(h.get('content-security-policy') ?? '');
	const frames = h.get('x-frame-options')?.toUpperCase();
	const ancestors = csp.get('frame-ancestors');
	soft(
		frames === 'DENY' || frames === 'SAMEORIGIN' || ancestors?.join(' ') === "'none'",
		`framing refused (X-Frame-Options ${frames}, frame-ancestors ${ancestors})`
	).toBe(true);
	tally.headers += 3;

	const type = h.get('content-type') ?? '';
	if (type.startsWith('text/html')) {
		const scripts = csp.get('script-src') ?? csp.get('default-src');
		soft(scripts, 'a CSP saying where scripts may come from').toBeTruthy();
		soft(scripts ?? [], 'no inline scripts without a nonce').not.toContain("'unsafe-inline'");
		soft(scripts ?? [], 'no eval').not.toContain("'unsafe-eval'");
		const objects = csp.get('object-src') ?? csp.get('default-src');
		soft(objects, 'object-src (or default-src) none').toEqual(["'none'"]);
		tally.headers++;
	}
	if (signedIn) {
		soft(h.get('cache-control') ?? '', 'Cache-Control for a signed-in answer').toContain(
			'no-store'
		);
		tally.headers++;
	}

	for (const cookie of h.getSetCookie()) {
		const [pair, ...attrs] = cookie.split(';').map((a) => a.trim());
		const names = attrs.map((a) => a.split('=')[0].toLowerCase());
		const name = pair.split('=')[0];
		soft(names, `cookie ${name} HttpOnly`).toContain('httponly');
		soft(names, `cookie ${name} SameSite`).toContain('samesite');
		soft(names, `cookie ${name} Path`).toContain('path');
		if (SECURE_COOKIES) soft(names, `cookie ${name} Secure`).toContain('secure');
		else soft(names, `cookie ${name} not Secure over http`).not.toContain('secure');
		tally.cookies++;
	}

	// Files (PDF, XLSX) are compressed bytes in which three letters can turn up by chance.
	if (isText(type) || !type) {
		for (const { name, re } of LEAK_PATTERNS) {
			const m = re.exec(body);
			soft(m?.[0] ?? null, `${name} in the body`).toBeNull();
		}
		tally.bodies++;
	}
}

/** A line for the end of a run: what was checked, in numbers. */
export function describeTally(label: string, tally: ResponseTally): string {
	return (
		`${label}: ${tally.responses} responses checked, ${tally.headers} security headers, ` +
		`${tally.cookies} Set-Cookie lines, ${tally.bodies} text bodies scanned for traces and SQL`
	);
}
