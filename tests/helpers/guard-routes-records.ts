// Guard-matrix rows for the training-record exports of the Records area.
import type { GuardRoute } from './guard-routes';

export const GUARD_ROUTES: GuardRoute[] = [
	{
		method: 'GET',
		path: '/records',
		allowedRoles: ['hr', 'quality'],
		// The Records area gives an admin only retention.
		redirects: { roles: ['admin'], location: '/records/retention' }
	},
	{ method: 'GET', path: '/records/export.csv', allowedRoles: ['hr', 'quality'], kind: 'download' },
	{ method: 'GET', path: '/records/export.xlsx', allowedRoles: ['hr', 'quality'], kind: 'download' }
];
