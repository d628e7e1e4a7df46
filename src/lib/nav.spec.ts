import { describe, expect, it } from 'vitest';
import { NAV, navFor, navGroups } from './nav';
import { ROLES } from './roles';

describe('navigation', () => {
	it('lists each heading once, its links together', () => {
		const headings = navGroups(NAV).map((g) => g.group);
		expect(new Set(headings).size).toBe(headings.length);
	});

	it('keeps every link of a role under its heading, in NAV order', () => {
		for (const role of ROLES) {
			const items = navFor([role]);
			expect(navGroups(items).flatMap((g) => g.items)).toEqual(items);
		}
	});

	it('gives an admin only admin links under plant set-up, and an operator none of them', () => {
		const admin = navGroups(navFor(['admin'])).find((g) => g.group === 'Plant set-up');
		expect(admin?.items.map((i) => i.href)).toEqual([
			'/admin/people',
			'/admin/plant',
			'/admin/api-keys',
			'/admin/mail'
		]);
		expect(navGroups(navFor(['operator'])).map((g) => g.group)).toEqual(['Daily work', 'Training']);
	});
});
