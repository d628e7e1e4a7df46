// The guard matrix: every route in the table × every kind of visitor → exactly the expected answer.
// Allowed: 200 (or the row's own answer). Signed in but not allowed: 403 with the helpful page (or
// JSON for APIs). Signed out: a 303 to sign-in that comes back (or 401 JSON for APIs). Every answer,
// whatever its status, also carries the security headers and safe cookies and leaks no trace or SQL
// (tests/helpers/response-checks.ts). The rows: tests/helpers/guard-table.ts.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ROLES, type Role } from '../../src/lib/roles';
import { closeDbHelpers, createTestPerson, retireTestPeople } from '../helpers/db';
import type { GuardRoute } from '../helpers/guard-routes';
import { GUARD_TABLE } from '../helpers/guard-table';
import {
	newClient,
	signInAsDemo,
	signInWithPassword,
	type HttpClient
} from '../helpers/http-session';
import { checkResponse, describeTally, newTally } from '../helpers/response-checks';

const ROUTES = GUARD_TABLE;

interface Visitor {
	label: string;
	roles: Role[] | null;
}

const VISITORS: Visitor[] = [
	{ label: 'signed out', roles: null },
	...ROLES.map((r) => ({ label: `demo ${r}`, roles: [r] })),
	// Holding two roles: the one that allows wins, and two that do not still do not.
	{ label: 'operator + admin', roles: ['operator', 'admin'] },
	{ label: 'quality + hr', roles: ['quality', 'hr'] }
];

const clients = new Map<string, HttpClient>();
let personId = 0;
const tally = newTally();

beforeAll(async () => {
	// The person the `{person}` rows are about: nobody above signs in as them.
	personId = (await createTestPerson({ roles: ['operator'], withEmail: false })).id;
	for (const v of VISITORS) {
		if (!v.roles) clients.set(v.label, newClient());
		else if (v.roles.length === 1) clients.set(v.label, await signInAsDemo(v.roles[0]));
		else {
			const p = await createTestPerson({ roles: v.roles });
			clients.set(v.label, await signInWithPassword(p.email!, p.password));
		}
	}
});

afterAll(async () => {
	console.info(
		describeTally(`guard matrix: ${ROUTES.length} routes × ${VISITORS.length} visitors`, tally)
	);
	await retireTestPeople();
	await closeDbHelpers();
});

function isAllowed(route: GuardRoute, roles: Role[] | null): boolean {
	if (route.allowedRoles === 'public') return true;
	if (!roles) return false;
	if (route.allowedRoles === 'signed-in') return true;
	return route.allowedRoles.some((r) => roles.includes(r));
}

function kindOf(route: GuardRoute) {
	return route.kind ?? (route.path.startsWith('/api/') ? 'api' : 'page');
}

function describeRoles(route: GuardRoute) {
	return Array.isArray(route.allowedRoles) ? route.allowedRoles.join('|') : route.allowedRoles;
}

async function request(client: HttpClient, route: GuardRoute, path: string) {
	const headers = kindOf(route) === 'api' ? { accept: 'application/json' } : undefined;
	return route.method === 'GET'
		? client.get(path, { headers })
		: client.postForm(path, route.form ?? {}, { headers });
}

describe.each(ROUTES.map((r) => [`${r.method} ${r.path} (${describeRoles(r)})`, r] as const))(
	'%s',
	(_name, route) => {
		it.each(VISITORS.map((v) => [v.label, v] as const))('%s', async (_label, visitor) => {
			const path = route.path.replace('{person}', String(personId));
			const res = await request(clients.get(visitor.label)!, route, path);
			const body = await res.text();
			const where = `${route.method} ${path} as ${visitor.label}`;
			const location = res.headers.get('location');
			checkResponse(res, body, where, !!visitor.roles, tally);

			if (isAllowed(route, visitor.roles)) {
				const want = (visitor.roles ? route.allowed : route.signedOut) ?? { status: 200 };
				expect(res.status, `${where}: ${body.slice(0, 200)}`).toBe(want.status);
				if (want.location) expect(location, where).toBe(want.location);
				return;
			}
			if (kindOf(route) === 'api') {
				expect(res.status, where).toBe(visitor.roles ? 403 : 401);
				expect(res.headers.get('content-type'), where).toContain('application/json');
				const json = JSON.parse(body);
				expect(typeof (json.error ?? json.message), where).toBe('string');
				return;
			}
			if (!visitor.roles) {
				expect(res.status, where).toBe(303);
				expect(location, where).toBe(`/signin?redirectTo=${encodeURIComponent(path)}`);
				return;
			}
			if (route.redirects?.roles.some((r) => visitor.roles!.includes(r))) {
				expect(res.status, where).toBe(303);
				expect(location, where).toBe(route.redirects.location);
				return;
			}
			if (kindOf(route) === 'download') {
				// A file endpoint: SvelteKit's plain error page, still saying why.
				expect(res.status, where).toBe(403);
				expect(body, where).toContain(
					`This page is for ${(route.allowedRoles as Role[]).join(', ')}`
				);
				expect(body, where).toContain(`Your roles: ${visitor.roles.join(', ')}`);
				return;
			}
			// The helpful 403 page: says what the page needs, what the visitor holds and what to do.
			expect(res.status, where).toBe(403);
			expect(body, where).toContain('Not for your role');
			expect(body, where).toContain(
				`This page is for ${(route.allowedRoles as Role[]).join(', ')}`
			);
			expect(body, where).toContain(`Your roles: ${visitor.roles.join(', ')}`);
			expect(body, where).toContain('ask an admin to give you the role');
		});
	}
);
