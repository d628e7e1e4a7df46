// Guard-matrix rows for Records → Retention (hr and admin; the rules only for admin). Posts carry
// input that is refused, so nothing changes. The dry run takes no input, so its 403s are checked in
// tests/integration/retention.test.ts instead (an allowed dry run records a run).
import type { GuardRoute } from './guard-routes';

export const GUARD_ROUTES: GuardRoute[] = [
	{ method: 'GET', path: '/records/retention', allowedRoles: ['hr', 'admin'] },
	{
		method: 'POST',
		path: '/records/retention?/rules',
		allowedRoles: ['admin'],
		form: { trainingRecordsYears: '0', gateLogYears: 'x', reason: '' },
		allowed: { status: 400 }
	},
	{
		method: 'POST',
		path: '/records/retention?/hold',
		allowedRoles: ['hr', 'admin'],
		form: { employeeNo: '', reason: '' },
		allowed: { status: 400 }
	},
	{
		method: 'POST',
		path: '/records/retention?/release',
		allowedRoles: ['hr', 'admin'],
		form: { holdId: 'x', reason: '' },
		allowed: { status: 400 }
	},
	{
		method: 'POST',
		path: '/records/retention?/run',
		allowedRoles: ['hr', 'admin'],
		form: { password: '' },
		allowed: { status: 400 }
	},
	{
		// A run nobody made: the 404 page for hr and admin, nothing about it for anyone else.
		method: 'GET',
		path: '/records/retention/runs/999999999',
		allowedRoles: ['hr', 'admin'],
		allowed: { status: 404 }
	}
];
