// Guard-matrix rows for the training histories, My records and the gate log page. The downloads
// (history PDF/JSON, gate log CSV) are +server files, whose refusals SvelteKit answers with its
// plain error page rather than the app's 403 page; tests/integration/records-history.test.ts and
// records-logs.test.ts check those routes for every role.
import type { GuardRoute } from './guard-routes';

export const GUARD_ROUTES: GuardRoute[] = [
	{ method: 'GET', path: '/records/people', allowedRoles: ['hr', 'quality'] },
	{ method: 'GET', path: '/records/people/{person}', allowedRoles: ['hr', 'quality'] },
	{ method: 'GET', path: '/records/logs', allowedRoles: ['quality', 'hr'] },
	{
		// Verifies the chain (reads only, records the check); anyone else is refused first.
		method: 'POST',
		path: '/records/logs?/verify',
		allowedRoles: ['quality', 'hr']
	},
	// Everyone has their own records.
	{ method: 'GET', path: '/my-records', allowedRoles: 'signed-in' },

	{ method: 'GET', path: '/my-records.json', allowedRoles: 'signed-in', kind: 'download' },
	{ method: 'GET', path: '/my-records.pdf', allowedRoles: 'signed-in', kind: 'download' },
	{
		method: 'GET',
		path: '/records/logs/gate-log.csv',
		allowedRoles: ['quality', 'hr'],
		kind: 'download'
	},
	{
		method: 'GET',
		path: '/records/people/{person}/history.json',
		allowedRoles: ['hr', 'quality'],
		kind: 'download'
	},
	{
		method: 'GET',
		path: '/records/people/{person}/history.pdf',
		allowedRoles: ['hr', 'quality'],
		kind: 'download'
	}
];
