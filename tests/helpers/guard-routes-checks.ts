// Guard-matrix rows for knowledge checks: authoring (trainer), approval (quality), taking (anyone
// signed in). Posts carry input that is refused, so nothing changes.
import type { GuardRoute } from './guard-routes';

export const GUARD_ROUTES: GuardRoute[] = [
	{ method: 'GET', path: '/checks', allowedRoles: ['trainer', 'quality'] },
	{
		method: 'POST',
		path: '/checks?/create',
		allowedRoles: ['trainer'],
		form: { code: 'not a code', title: '' },
		allowed: { status: 400 }
	},
	{ method: 'GET', path: '/training/checks', allowedRoles: 'signed-in' },
	// A check nobody is asked to take: signed-in people get the 404 page, nobody gets data.
	{
		method: 'GET',
		path: '/training/checks/KC-NONE-X',
		allowedRoles: 'signed-in',
		allowed: { status: 404 }
	},
	{
		method: 'POST',
		path: '/training/checks?/start',
		allowedRoles: 'signed-in',
		form: { processId: 'x' },
		allowed: { status: 400 }
	}
];
