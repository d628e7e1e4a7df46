// Every route in src/routes (page, form action, endpoint method) has a row in the guard matrix
// (tests/integration/guards.test.ts), or an entry with its reason in GUARD_EXEMPTIONS. A new route
// without a row fails here, naming it.
import { describe, expect, it } from 'vitest';
import { GUARD_EXEMPTIONS, GUARD_TABLE } from '../helpers/guard-table';
import { describeRoute, pathMatcher, routeInventory } from '../helpers/route-inventory';

const inventory = routeInventory();

/** A row's path with placeholders filled and the action split off. */
function rowParts(path: string) {
	const [pathname, query = ''] = path.replace('{person}', '1').split('?');
	const action = query.startsWith('/') ? query.slice(1).split('&')[0] : null;
	return { pathname, action };
}

describe('the route inventory', () => {
	it('finds the routes on disk', () => {
		// A floor, so a broken walk (wrong folder, nothing parsed) cannot pass as "all covered".
		expect(inventory.filter((r) => r.kind === 'page').length).toBeGreaterThan(50);
		expect(inventory.filter((r) => r.kind === 'action').length).toBeGreaterThan(40);
		expect(inventory.filter((r) => r.kind === 'endpoint').length).toBeGreaterThan(20);
		const names = inventory.map(describeRoute);
		expect(names).toContain('POST /admin/people/[id=id]?/reset');
		expect(names).toContain('POST /instructions/[doc=docNumber]/acknowledge');
		expect(names).toContain('POST /api/v1/attempts/[id=id]/submit');
		expect(names).toContain('GET /stations/[code=stationCode]/gate');
	});

	it('has a guard-matrix row for every route, or a stated exemption', async () => {
		const rows = GUARD_TABLE.map((r) => ({ ...r, ...rowParts(r.path) }));
		const exempt = new Set(GUARD_EXEMPTIONS.map((e) => e.route));
		const missing: string[] = [];
		for (const route of inventory) {
			const name = describeRoute(route);
			if (exempt.has(name)) continue;
			const matches = await pathMatcher(route.routeId);
			const covered = rows.some((row) => {
				if (!matches(row.pathname)) return false;
				if (route.kind === 'action') {
					return row.method === 'POST' && (row.action ?? 'default') === route.action;
				}
				return row.method === route.method && row.action === null;
			});
			if (!covered) missing.push(name);
		}
		expect(missing, `routes without a guard-matrix row:\n  ${missing.join('\n  ')}`).toEqual([]);
		console.info(
			`route inventory: ${inventory.length} routes (${inventory.filter((r) => r.kind === 'page').length} pages, ` +
				`${inventory.filter((r) => r.kind === 'action').length} form actions, ` +
				`${inventory.filter((r) => r.kind === 'endpoint').length} endpoint methods), ` +
				`${GUARD_TABLE.length} guard rows, ${GUARD_EXEMPTIONS.length} exemptions`
		);
	});

	it('lists only exemptions that still exist, each with a reason', () => {
		const names = new Set(inventory.map(describeRoute));
		for (const e of GUARD_EXEMPTIONS) {
			expect(names.has(e.route), `exempted route ${e.route} no longer exists`).toBe(true);
			expect(e.reason.length, `${e.route} needs a reason`).toBeGreaterThan(20);
		}
		expect(new Set(GUARD_EXEMPTIONS.map((e) => e.route)).size).toBe(GUARD_EXEMPTIONS.length);
	});
});
