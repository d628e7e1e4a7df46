// Guard-matrix rows for the calculators, their API and the API key admin screen.
import type { GuardRoute } from './guard-routes';

export const GUARD_ROUTES: GuardRoute[] = [
	{ method: 'GET', path: '/calculators', allowedRoles: 'signed-in' },
	{ method: 'GET', path: '/help', allowedRoles: 'signed-in' },
	{ method: 'GET', path: '/api/v1/calculators', allowedRoles: 'signed-in', kind: 'api' },
	{ method: 'GET', path: '/admin/api-keys', allowedRoles: ['admin'] },

	{
		method: 'POST',
		path: '/admin/api-keys?/create',
		allowedRoles: ['admin'],
		form: { name: '', scopes: 'nothing' },
		allowed: { status: 400 }
	},
	{
		method: 'POST',
		path: '/admin/api-keys?/rotate',
		allowedRoles: ['admin'],
		form: { id: 'x' },
		allowed: { status: 400 }
	},
	{
		method: 'POST',
		path: '/admin/api-keys?/revoke',
		allowedRoles: ['admin'],
		form: { id: 'x' },
		allowed: { status: 400 }
	},
	{ method: 'GET', path: '/calculators/bond-force', allowedRoles: 'signed-in' },
	{ method: 'GET', path: '/api/v1/calculators/bond-force', allowedRoles: 'signed-in', kind: 'api' },
	{
		// A form body instead of JSON inputs: 415 with what to send, nothing computed.
		method: 'POST',
		path: '/api/v1/calculators/bond-force',
		allowedRoles: 'signed-in',
		kind: 'api',
		form: { x: '1' },
		allowed: { status: 415 }
	},
	{ method: 'GET', path: '/help/safety', allowedRoles: 'signed-in' }
];
