// Signing in over plain HTTP, as a browser without JavaScript would: POST the password form and
// keep the Auth.js session cookie for later requests.

export const SESSION_COOKIE = 'authjs.session-token';

/** Signs in with e-mail and password; returns the `authjs.session-token=...` cookie pair. */
export async function signInWithPassword(
	baseUrl: string,
	email: string,
	password: string,
	redirectTo = '/'
): Promise<string> {
	const res = await fetch(`${baseUrl}/signin?/password`, {
		method: 'POST',
		headers: {
			'content-type': 'application/x-www-form-urlencoded',
			// SvelteKit refuses form posts whose Origin is not its own.
			origin: baseUrl
		},
		body: new URLSearchParams({ email, password, redirectTo }),
		redirect: 'manual'
	});
	const cookie = res.headers
		.getSetCookie()
		.map((line) => line.split(';')[0])
		.find(
			(pair) => pair.startsWith(`${SESSION_COOKIE}=`) && pair.length > SESSION_COOKIE.length + 1
		);
	if (!cookie) throw new Error(`Sign-in as ${email} gave no session cookie (HTTP ${res.status})`);
	return cookie;
}
