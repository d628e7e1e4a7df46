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
	},

	// A check (and version, question) nobody made: the 404 page for those allowed, nothing about it
	// for anyone else.
	{
		method: 'GET',
		path: '/checks/999999999',
		allowedRoles: ['trainer', 'quality'],
		allowed: { status: 404 }
	},
	{
		method: 'POST',
		path: '/checks/999999999?/newVersion',
		allowedRoles: ['trainer'],
		allowed: { status: 404 }
	},
	{
		method: 'GET',
		path: '/checks/999999999/stats',
		allowedRoles: ['trainer', 'quality'],
		allowed: { status: 404 }
	},
	{
		method: 'GET',
		path: '/checks/999999999/versions/999999999',
		allowedRoles: ['trainer', 'quality'],
		allowed: { status: 404 }
	},
	...(['settings', 'remove', 'submit'] as const).map((action): GuardRoute => ({
		method: 'POST',
		path: `/checks/999999999/versions/999999999?/${action}`,
		allowedRoles: ['trainer'],
		form: { questionId: 'x' },
		allowed: { status: 404 }
	})),
	...(['approve', 'return'] as const).map((action): GuardRoute => ({
		method: 'POST',
		path: `/checks/999999999/versions/999999999?/${action}`,
		allowedRoles: ['quality'],
		form: { password: '', reason: '' },
		allowed: { status: 404 }
	})),
	...['new', '999999999'].flatMap((q): GuardRoute[] => [
		{
			method: 'GET',
			path: `/checks/999999999/versions/999999999/questions/${q}`,
			allowedRoles: ['trainer'],
			allowed: { status: 404 }
		},
		{
			method: 'POST',
			path: `/checks/999999999/versions/999999999/questions/${q}`,
			allowedRoles: ['trainer'],
			form: { prompt: '' },
			allowed: { status: 404 }
		}
	]),
	// An attempt that does not exist, or is somebody else's: 404 for everyone signed in.
	{
		method: 'GET',
		path: '/training/attempts/999999999',
		allowedRoles: 'signed-in',
		allowed: { status: 404 }
	},
	...(['save', 'submit'] as const).map((action): GuardRoute => ({
		method: 'POST',
		path: `/training/attempts/999999999?/${action}`,
		allowedRoles: 'signed-in',
		form: { x: '1' },
		allowed: { status: 404 }
	})),
	{
		method: 'GET',
		path: '/api/v1/attempts/999999999',
		allowedRoles: 'signed-in',
		kind: 'api',
		allowed: { status: 404 }
	},
	{
		// The body is read before the attempt: a form body is refused as not JSON (415).
		method: 'POST',
		path: '/api/v1/attempts/999999999/submit',
		allowedRoles: 'signed-in',
		kind: 'api',
		form: { x: '1' },
		allowed: { status: 415 }
	}
];
