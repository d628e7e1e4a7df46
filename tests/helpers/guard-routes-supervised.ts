// Guard-matrix rows for supervised runs (lead, quality, admin) and the station kiosk (no session:
// the kiosk is authorised by its pairing key, so everybody reaches the pairing prompt).
import type { GuardRoute } from './guard-routes';

export const GUARD_ROUTES: GuardRoute[] = [
	{ method: 'GET', path: '/supervised-runs', allowedRoles: ['lead', 'quality', 'admin'] },
	{
		method: 'POST',
		path: '/supervised-runs?/grant',
		allowedRoles: ['lead', 'quality', 'admin'],
		form: { personId: '', reason: '' },
		allowed: { status: 400 }
	},
	{
		method: 'POST',
		path: '/supervised-runs?/revoke',
		allowedRoles: ['lead', 'quality', 'admin'],
		form: { runId: 'x', reason: '' },
		allowed: { status: 400 }
	},
	{ method: 'GET', path: '/stations/L2-FOG-03/gate', allowedRoles: 'public' }
];
