// Guard-matrix rows for the instructions register and the station pages.
import type { GuardRoute } from './guard-routes';

/** An instruction that does not exist; the document number is well formed. */
const DOC = '/instructions/WI-NONE-999';

export const GUARD_ROUTES: GuardRoute[] = [
	{ method: 'GET', path: '/instructions', allowedRoles: 'signed-in' },
	{ method: 'GET', path: '/stations/L2-FOG-03', allowedRoles: 'signed-in' },

	// An instruction nobody wrote (WI-NONE-999): anyone signed in may look and gets the 404 page;
	// authoring and approving are refused before the look-up to anyone without the role.
	{ method: 'GET', path: '/instructions/new', allowedRoles: ['trainer', 'quality'] },
	{
		method: 'POST',
		path: '/instructions/new',
		allowedRoles: ['trainer', 'quality'],
		form: { docNumber: 'not a number', title: '' },
		allowed: { status: 400 }
	},
	{ method: 'GET', path: `${DOC}`, allowedRoles: 'signed-in', allowed: { status: 404 } },
	{
		method: 'POST',
		path: `${DOC}?/newRevision`,
		allowedRoles: ['trainer', 'quality'],
		allowed: { status: 404 }
	},
	{
		method: 'POST',
		path: `${DOC}?/withdraw`,
		allowedRoles: ['quality'],
		form: { reason: '', password: '' },
		allowed: { status: 404 }
	},
	{
		method: 'GET',
		path: `${DOC}/acknowledge`,
		allowedRoles: 'signed-in',
		allowed: { status: 404 }
	},
	{
		method: 'POST',
		path: `${DOC}/acknowledge`,
		allowedRoles: 'signed-in',
		form: { password: '' },
		allowed: { status: 404 }
	},
	{
		method: 'GET',
		path: `${DOC}/revisions/A`,
		allowedRoles: 'signed-in',
		allowed: { status: 404 }
	},
	{
		method: 'GET',
		path: `${DOC}/revisions/A/edit`,
		allowedRoles: ['trainer', 'quality'],
		allowed: { status: 404 }
	},
	...(['save', 'submit', 'upload', 'removeFile'] as const).map((action): GuardRoute => ({
		method: 'POST',
		path: `${DOC}/revisions/A/edit?/${action}`,
		allowedRoles: ['trainer', 'quality'],
		form: { source: '', version: 'x' },
		allowed: { status: 404 }
	})),
	{
		method: 'GET',
		path: `${DOC}/revisions/A/files/999999999`,
		allowedRoles: 'signed-in',
		kind: 'api',
		allowed: { status: 404 }
	},
	{
		method: 'GET',
		path: `${DOC}/revisions/A/review`,
		allowedRoles: ['quality'],
		allowed: { status: 404 }
	},
	...(['sign', 'reject'] as const).map((action): GuardRoute => ({
		method: 'POST',
		path: `${DOC}/revisions/A/review?/${action}`,
		allowedRoles: ['quality'],
		form: { password: '', reason: '' },
		allowed: { status: 404 }
	})),
	{
		method: 'GET',
		path: `/api/v1${DOC}`,
		allowedRoles: 'signed-in',
		kind: 'api',
		allowed: { status: 404 }
	},
	{
		method: 'GET',
		path: `/api/v1${DOC}/revisions/A`,
		allowedRoles: 'signed-in',
		kind: 'api',
		allowed: { status: 404 }
	},
	// The body is checked before the revision is looked up: the draft wants JSON, so a form body is
	// a 415; the files endpoint takes a form, and one without the file is a 400.
	...(
		[
			['draft', 415],
			['files', 400]
		] as const
	).map(([what, status]): GuardRoute => ({
		method: 'POST',
		path: `/api/v1${DOC}/revisions/A/${what}`,
		allowedRoles: ['trainer', 'quality'],
		kind: 'api',
		form: { source: '' },
		allowed: { status }
	})),
	{
		// A form body, not the JSON the preview wants: 415, saying what to send.
		method: 'POST',
		path: '/api/v1/instructions/preview',
		allowedRoles: ['trainer', 'quality'],
		kind: 'api',
		form: { source: '' },
		allowed: { status: 415 }
	},
	{ method: 'GET', path: '/api/v1/search?q=bond', allowedRoles: 'signed-in', kind: 'api' }
];
