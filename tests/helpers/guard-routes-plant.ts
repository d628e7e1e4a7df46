// Guard-matrix rows for the plant admin screens and the audit trail (the CSV export's access is
// covered by tests/integration/audit-export.test.ts, since a download has no HTML 403 page).
import type { GuardRoute } from './guard-routes';

export const GUARD_ROUTES: GuardRoute[] = [
	{ method: 'GET', path: '/admin/plant', allowedRoles: ['admin'] },
	{ method: 'GET', path: '/admin/plant/lines', allowedRoles: ['admin'] },
	{ method: 'GET', path: '/admin/plant/shifts', allowedRoles: ['admin'] },
	{ method: 'GET', path: '/admin/plant/processes', allowedRoles: ['admin'] },
	{ method: 'GET', path: '/admin/plant/stations', allowedRoles: ['admin'] },
	{ method: 'GET', path: '/audit', allowedRoles: ['quality', 'admin'] },

	// The edit screens of a line, shift, process or station nobody made (id 999999999): admin gets
	// the 404 page, everybody else is refused before the look-up.
	...(['lines', 'shifts', 'processes', 'stations'] as const).flatMap((kind): GuardRoute[] => [
		{ method: 'GET', path: `/admin/plant/${kind}/new`, allowedRoles: ['admin'] },
		{
			method: 'POST',
			path: `/admin/plant/${kind}/new?/save`,
			allowedRoles: ['admin'],
			form: { code: '', name: '' },
			allowed: { status: 400 }
		},
		{
			method: 'GET',
			path: `/admin/plant/${kind}/999999999`,
			allowedRoles: ['admin'],
			allowed: { status: 404 }
		},
		{
			method: 'POST',
			path: `/admin/plant/${kind}/999999999?/save`,
			allowedRoles: ['admin'],
			form: { code: '', name: '' },
			allowed: { status: 404 }
		}
	]),
	...(['lines', 'processes', 'stations'] as const).flatMap((kind) =>
		(['deactivate', 'reactivate'] as const).map((action): GuardRoute => ({
			method: 'POST',
			path: `/admin/plant/${kind}/999999999?/${action}`,
			allowedRoles: ['admin'],
			form: { reason: '' },
			allowed: { status: 404 }
		}))
	),
	{
		// Verifies the hash chain (reads only, records the check).
		method: 'POST',
		path: '/audit?/verify',
		allowedRoles: ['quality', 'admin']
	},
	{ method: 'GET', path: '/audit/export.csv', allowedRoles: ['quality', 'admin'], kind: 'download' }
];
