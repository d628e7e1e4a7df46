// Guard-matrix rows for the certificate pages and the public verification page.
import type { GuardRoute } from './guard-routes';

export const GUARD_ROUTES: GuardRoute[] = [
	// Everyone signed in: a holder sees their own certificates, quality and admin see all.
	{ method: 'GET', path: '/certificates', allowedRoles: 'signed-in' },
	{
		// No sign-in needed; an unknown code is a plain 404 for everybody.
		method: 'GET',
		path: '/verify/guard-matrix-unknown-code-0000000',
		allowedRoles: 'public',
		allowed: { status: 404 },
		signedOut: { status: 404 }
	}
];
