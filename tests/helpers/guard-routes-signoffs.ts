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
	{ method: 'GET', path: '/my-signoffs', allowedRoles: 'signed-in' },

	// A sign-off and a checklist nobody made: 404 for those who may look, nothing for the rest.
	{
		method: 'GET',
		path: '/signoffs/999999999',
		allowedRoles: 'signed-in',
		allowed: { status: 404 }
	},
	...(['item', 'sign', 'countersign'] as const).map((action): GuardRoute => ({
		method: 'POST',
		path: `/signoffs/999999999?/${action}`,
		allowedRoles: 'signed-in',
		form: { itemId: 'x', password: '' },
		allowed: { status: 404 }
	})),
	{
		method: 'GET',
		path: '/signoffs/999999999/photos/999999999',
		allowedRoles: 'signed-in',
		kind: 'download',
		allowed: { status: 404 }
	},
	{
		method: 'GET',
		path: '/signoffs/checklists/999999999',
		allowedRoles: ['trainer', 'quality'],
		allowed: { status: 404 }
	},
	...(['save', 'retire'] as const).map((action): GuardRoute => ({
		method: 'POST',
		path: `/signoffs/checklists/999999999?/${action}`,
		allowedRoles: ['trainer', 'quality'],
		form: { title: '', reason: '' },
		allowed: { status: 404 }
	}))
];
