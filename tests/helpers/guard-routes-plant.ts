// Guard-matrix rows for the plant admin screens and the audit trail (the CSV export's access is
// covered by tests/integration/audit-export.test.ts, since a download has no HTML 403 page).
import type { GuardRoute } from './guard-routes';

export const GUARD_ROUTES: GuardRoute[] = [
	{ method: 'GET', path: '/admin/plant', allowedRoles: ['admin'] },
	{ method: 'GET', path: '/admin/plant/lines', allowedRoles: ['admin'] },
	{ method: 'GET', path: '/admin/plant/shifts', allowedRoles: ['admin'] },
	{ method: 'GET', path: '/admin/plant/processes', allowedRoles: ['admin'] },
	{ method: 'GET', path: '/admin/plant/stations', allowedRoles: ['admin'] },
	{ method: 'GET', path: '/admin/plant/stations/new', allowedRoles: ['admin'] },
	{ method: 'GET', path: '/audit', allowedRoles: ['quality', 'admin'] }
];
