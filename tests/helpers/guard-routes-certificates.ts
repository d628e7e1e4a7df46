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
	},

	// A certificate nobody holds: the 404 page for everyone signed in; the lifecycle actions are
	// refused before the look-up to anyone but quality and admin.
	{
		method: 'GET',
		path: '/certificates/999999999',
		allowedRoles: 'signed-in',
		allowed: { status: 404 }
	},
	...(['suspend', 'reinstate', 'withdraw'] as const).map((action): GuardRoute => ({
		method: 'POST',
		path: `/certificates/999999999?/${action}`,
		allowedRoles: ['quality', 'admin'],
		form: { reason: '', password: '' },
		allowed: { status: 404 }
	})),
	{
		method: 'GET',
		path: '/certificates/999999999/pdf',
		allowedRoles: 'signed-in',
		kind: 'download',
		allowed: { status: 404 }
	}
];
