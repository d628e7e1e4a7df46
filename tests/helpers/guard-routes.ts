// The route table of the guard matrix (tests/integration/guards.test.ts): every row is requested
// by a signed-out visitor, by every demo role and by people holding two roles, and the answer
// must be exactly what the row says.
//
// To add routes from another area, either append rows here or put a file next to this one named
// `guard-routes-<area>.ts` that exports `GUARD_ROUTES: GuardRoute[]`; the matrix picks up every such
// file. Only list routes that exist.
import type { Role } from '../../src/lib/roles';
import type { FormFields } from './http-session';

export interface GuardRoute {
	method: 'GET' | 'POST';
	/**
	 * A concrete path. `{person}` is replaced by the id of a throwaway person the matrix creates,
	 * so rows can reach pages about one person without touching the demo people.
	 */
	path: string;
	/** Any one of these roles is enough; 'signed-in' is everybody signed in; 'public' is everybody. */
	allowedRoles: readonly Role[] | 'signed-in' | 'public';
	/**
	 * 'api' answers 401/403 as JSON; 'page' redirects to sign-in or shows the 403 page; 'download'
	 * (a file endpoint that pages link to) redirects to sign-in or answers 403 with the role message
	 * on SvelteKit's plain error page.
	 */
	kind?: 'page' | 'api' | 'download';
	/** Body of a POST, sent as a urlencoded form. Use input that is refused, so nothing changes. */
	form?: FormFields;
	/** What someone allowed gets, when it is not a plain 200. */
	allowed?: { status: number; location?: string };
	/**
	 * Signed-in visitors holding none of allowedRoles but one of these are sent to `location` with a
	 * 303 instead of being refused (an admin opening /records lands on /records/retention).
	 */
	redirects?: { roles: readonly Role[]; location: string };
	/** What a signed-out visitor gets on a 'public' row, when it is not a plain 200. */
	signedOut?: { status: number; location?: string };
}

export const GUARD_ROUTES: GuardRoute[] = [
	{ method: 'GET', path: '/', allowedRoles: 'signed-in' },
	{ method: 'GET', path: '/admin/people', allowedRoles: ['admin'] },
	{ method: 'GET', path: '/admin/people/new', allowedRoles: ['admin'] },
	{
		// An empty form: an admin gets the field errors back (400), nobody else gets that far.
		method: 'POST',
		path: '/admin/people/new?/save',
		allowedRoles: ['admin'],
		form: { displayName: '' },
		allowed: { status: 400 }
	},
	{ method: 'GET', path: '/admin/people/{person}', allowedRoles: ['admin'] },
	{
		method: 'POST',
		path: '/admin/people/{person}?/save',
		allowedRoles: ['admin'],
		form: { displayName: '' },
		allowed: { status: 400 }
	},
	{
		method: 'POST',
		path: '/admin/people/{person}?/reset',
		allowedRoles: ['admin'],
		form: { kind: 'pin', secret: '12', reason: '' },
		allowed: { status: 400 }
	},
	{
		method: 'POST',
		path: '/admin/people/{person}?/deactivate',
		allowedRoles: ['admin'],
		form: { reason: '' },
		allowed: { status: 400 }
	},
	{
		method: 'POST',
		path: '/admin/people/{person}?/reactivate',
		allowedRoles: ['admin'],
		form: { reason: '' },
		allowed: { status: 400 }
	},
	{
		method: 'GET',
		path: '/signin',
		allowedRoles: 'public',
		// Someone already signed in is sent home.
		allowed: { status: 303, location: '/' }
	},
	{
		method: 'GET',
		path: '/signout',
		allowedRoles: 'public',
		// Signing out is a POST; a GET just goes home (and from there to sign-in when signed out).
		allowed: { status: 303, location: '/' },
		signedOut: { status: 303, location: '/' }
	},
	{ method: 'GET', path: '/api/health', allowedRoles: 'public', kind: 'api' },

	// Sign-in posts with nothing filled in: the field errors when signed out (no attempt is
	// counted); someone signed in is sent home by the page's load, which runs after the action.
	...(['password', 'badge'] as const).map((action): GuardRoute => ({
		method: 'POST',
		path: `/signin?/${action}`,
		allowedRoles: 'public',
		form: { redirectTo: '/' },
		allowed: { status: 303, location: '/' },
		signedOut: { status: 400 }
	}))
];
