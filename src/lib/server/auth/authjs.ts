import { SvelteKitAuth, CredentialsSignin } from '@auth/sveltekit';
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
