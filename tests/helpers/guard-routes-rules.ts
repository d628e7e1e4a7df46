// Guard-matrix rows for certification rules, assignments and the crew page.
import type { GuardRoute } from './guard-routes';

export const GUARD_ROUTES: GuardRoute[] = [
	{ method: 'GET', path: '/rules', allowedRoles: ['quality', 'admin'] },
	{ method: 'GET', path: '/rules/COG-MB', allowedRoles: ['quality', 'admin'] },
	{
		// Pass mark 120 is refused: quality gets the field errors back, nobody else gets that far.
		method: 'POST',
		path: '/rules/COG-MB?/save',
		allowedRoles: ['quality'],
		form: { previousVersion: 0, passMarkPct: 120, practicalRequired: 'false' },
		allowed: { status: 400 }
	},
	{ method: 'GET', path: '/assignments', allowedRoles: ['quality', 'trainer', 'lead', 'admin'] },
	{
		method: 'POST',
		path: '/assignments?/assign',
		allowedRoles: ['quality', 'trainer', 'lead', 'admin'],
		form: { processId: 0, scope: 'line' },
		allowed: { status: 400 }
	},
	{
		method: 'POST',
		path: '/assignments?/close',
		allowedRoles: ['quality', 'trainer', 'lead', 'admin'],
		form: { assignmentId: 1, reason: '' },
		allowed: { status: 400 }
	},
	{ method: 'GET', path: '/crew', allowedRoles: ['lead', 'quality', 'admin'] }
];
