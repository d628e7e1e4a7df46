// Guard-matrix rows for practical sign-offs and their checklists.
import type { GuardRoute } from './guard-routes';

export const GUARD_ROUTES: GuardRoute[] = [
	{ method: 'GET', path: '/signoffs', allowedRoles: ['trainer', 'quality', 'admin'] },
	{ method: 'GET', path: '/signoffs/new', allowedRoles: ['trainer'] },
	{
		// No operator chosen: a trainer gets the field errors back, nobody else gets that far.
		method: 'POST',
		path: '/signoffs/new?/start',
		allowedRoles: ['trainer'],
		form: { personId: '', checklistId: '' },
		allowed: { status: 400 }
	},
	{ method: 'GET', path: '/signoffs/checklists', allowedRoles: ['trainer', 'quality'] },
	{ method: 'GET', path: '/signoffs/checklists/new', allowedRoles: ['trainer', 'quality'] },
	{
		method: 'POST',
		path: '/signoffs/checklists/new?/save',
		allowedRoles: ['trainer', 'quality'],
		form: { title: '', revisionId: '', items: '' },
		allowed: { status: 400 }
	},
	{ method: 'GET', path: '/my-signoffs', allowedRoles: 'signed-in' }
];
