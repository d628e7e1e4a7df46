// Guard-matrix rows for "My messages".
import type { GuardRoute } from './guard-routes';

export const GUARD_ROUTES: GuardRoute[] = [
	{ method: 'GET', path: '/messages', allowedRoles: 'signed-in' },
	// A message nobody can see (no such id) answers 404 to everyone signed in, sign-in otherwise.
	{
		method: 'GET',
		path: '/messages/999999999',
		allowedRoles: 'signed-in',
		allowed: { status: 404 }
	}
];
