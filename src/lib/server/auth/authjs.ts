import { SvelteKitAuth, CredentialsSignin } from '@auth/sveltekit';
import { isRedirect, type RequestEvent } from '@sveltejs/kit';
import Credentials from '@auth/sveltekit/providers/credentials';
import { config } from '../config';
import { attemptSignIn, type SignInMethod } from './signin';

class ThrottledSignIn extends CredentialsSignin {
	code = 'throttled';
}

declare module '@auth/sveltekit' {
	interface Session {
		sid?: string;
	}
}

function provider(id: SignInMethod, address: string) {
	const [idField, secretField] = id === 'password' ? ['email', 'password'] : ['badge', 'pin'];
	return Credentials({
		id,
		credentials: { [idField]: {}, [secretField]: {} },
		async authorize(credentials) {
			const identifier = String(credentials[idField] ?? '');
			const secret = String(credentials[secretField] ?? '');
			const result = await attemptSignIn(id, identifier, secret, address);
			if (!result.ok) {
				if (result.reason === 'throttled') throw new ThrottledSignIn();
				return null;
			}
			return { id: String(result.personId), name: result.displayName, sid: result.sessionId };
		}
	});
}

/** Auth.js, configured per request so the credentials check sees the client address. */
export const { handle, signIn, signOut } = SvelteKitAuth(async (event) => {
	let address = 'unknown';
	try {
		address = event.getClientAddress();
	} catch {
		// no address available (prerendering); throttling then keys on the account only
	}
	return {
		secret: config.authSecret,
		trustHost: true,
		providers: [provider('password', address), provider('badge', address)],
		session: { strategy: 'jwt', maxAge: config.sessionHours * 3600 },
		pages: { signIn: '/signin', error: '/signin' },
		logger: {
			error: (err) => {
				// A wrong password is an ordinary outcome, answered on the form.
				if (err instanceof CredentialsSignin) return;
				// An unreadable cookie (forged, or sealed with an old AUTH_SECRET) just means signed out.
				if ((err as { type?: string }).type === 'JWTSessionError')
					console.warn('auth: unreadable session cookie ignored');
				else console.error('auth:', err);
			},
			warn: (code) => {
				// @auth/sveltekit turns off Auth.js's CSRF token on purpose; SvelteKit's Origin check covers it.
				if (code !== 'csrf-disabled') console.warn('auth:', code);
			}
		},
		callbacks: {
			jwt({ token, user }) {
				if (user && 'sid' in user) token.sid = user.sid as string;
				return token;
			},
			session({ session, token }) {
				session.sid = typeof token.sid === 'string' ? token.sid : undefined;
				return session;
			}
		}
	};
});

/**
 * Auth.js's SvelteKit actions read their own form data; this gives them a copy of the event with a
 * fresh form, so our action can validate the real form first.
 */
export function withForm<E extends { request: Request }>(
	event: E,
	fields: Record<string, string>
): E {
	const body = new FormData();
	for (const [k, v] of Object.entries(fields)) body.set(k, v);
	const headers = new Headers(event.request.headers);
	headers.delete('content-type');
	headers.delete('content-length');
	return { ...event, request: new Request(event.request.url, { method: 'POST', headers, body }) };
}

export type CredentialsOutcome = 'signed-in' | 'failed' | 'throttled';

/**
 * Runs Auth.js's credentials sign-in with `fields` (providerId, the identifier and secret). On
 * success the session cookie is set on the event. Auth.js in raw mode throws CredentialsSignin for a
 * refused sign-in instead of redirecting to its error page, so both shapes are translated here.
 */
export async function signInWithCredentials(
	event: RequestEvent,
	fields: Record<string, string>
): Promise<CredentialsOutcome> {
	try {
		// Auth.js redirects to its callback URL on success; the caller picks the real destination.
		await signIn(withForm(event, { ...fields, redirectTo: '/' }));
	} catch (err) {
		if (err instanceof CredentialsSignin) return err.code === 'throttled' ? 'throttled' : 'failed';
		if (!isRedirect(err)) throw err;
		const target = new URL(err.location, event.url);
		if (!target.searchParams.has('error')) return 'signed-in';
		return target.searchParams.get('code') === 'throttled' ? 'throttled' : 'failed';
	}
	return 'failed';
}

/** Clears the Auth.js session cookie. Auth.js answers with a 302; the caller redirects with 303. */
export async function clearSessionCookie(event: RequestEvent): Promise<void> {
	try {
		await signOut(withForm(event, { redirectTo: '/signin' }));
	} catch (err) {
		if (!isRedirect(err)) throw err;
	}
}
