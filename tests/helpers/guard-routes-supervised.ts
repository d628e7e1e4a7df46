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
	{ method: 'GET', path: '/stations/L2-FOG-03/gate', allowedRoles: 'public' },

	// The kiosk's actions need no session either. A key that is no key is refused; unpairing a
	// terminal that is not paired just goes back to the prompt; a scan on an unpaired terminal is 401.
	{
		method: 'POST',
		path: '/stations/L2-FOG-03/gate?/pair',
		allowedRoles: 'public',
		form: { key: '' },
		allowed: { status: 400 },
		signedOut: { status: 400 }
	},
	{
		method: 'POST',
		path: '/stations/L2-FOG-03/gate?/unpair',
		allowedRoles: 'public',
		allowed: { status: 303, location: '/stations/L2-FOG-03/gate' },
		signedOut: { status: 303, location: '/stations/L2-FOG-03/gate' }
	},
	{
		method: 'POST',
		path: '/stations/L2-FOG-03/gate?/check',
		allowedRoles: 'public',
		form: { badge: 'B-NONE' },
		allowed: { status: 401 },
		signedOut: { status: 401 }
	},
	{
		// The gate API takes an API key, never a session: without one everybody gets 401 JSON.
		method: 'POST',
		path: '/api/v1/gate/checks',
		allowedRoles: 'public',
		kind: 'api',
		form: { station: 'L2-FOG-03', badge: 'B-NONE' },
		allowed: { status: 401 },
		signedOut: { status: 401 }
	}
];
