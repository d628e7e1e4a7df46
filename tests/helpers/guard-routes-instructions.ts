// Guard-matrix rows for the instructions register and the station pages.
import type { GuardRoute } from './guard-routes';

export const GUARD_ROUTES: GuardRoute[] = [
	{ method: 'GET', path: '/instructions', allowedRoles: 'signed-in' },
	{ method: 'GET', path: '/stations/L2-FOG-03', allowedRoles: 'signed-in' }
];
