// Guard-matrix rows for the Readiness board page and its API.
import type { GuardRoute } from './guard-routes';

export const GUARD_ROUTES: GuardRoute[] = [
	{ method: 'GET', path: '/readiness', allowedRoles: ['lead', 'quality', 'admin'] },
	{
		method: 'GET',
		path: '/api/v1/readiness',
		allowedRoles: ['lead', 'quality', 'admin'],
		kind: 'api'
	},
	{
		method: 'GET',
		path: '/api/v1/readiness.csv',
		allowedRoles: ['lead', 'quality', 'admin'],
		kind: 'api'
	}
];
