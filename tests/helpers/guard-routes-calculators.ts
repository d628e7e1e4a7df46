// Guard-matrix rows for the calculators, their API and the API key admin screen.
import type { GuardRoute } from './guard-routes';

export const GUARD_ROUTES: GuardRoute[] = [
	{ method: 'GET', path: '/calculators', allowedRoles: 'signed-in' },
	{ method: 'GET', path: '/calculators/bond-force', allowedRoles: 'signed-in' },
	{ method: 'GET', path: '/help', allowedRoles: 'signed-in' },
	{ method: 'GET', path: '/api/v1/calculators', allowedRoles: 'signed-in', kind: 'api' },
	{ method: 'GET', path: '/admin/api-keys', allowedRoles: ['admin'] }
];
