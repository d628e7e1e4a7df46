import type { Role } from './roles';

export type NavGroup =
	'Daily work' | 'Training' | 'On the line' | 'Quality and records' | 'Plant set-up';

export interface NavItem {
	href: string;
	label: string;
	/** The heading the link is listed under in the side navigation. */
	group: NavGroup;
	/** Shown to anyone holding one of these roles; empty means every signed-in person. */
	roles: Role[];
}

/** The areas of Padbridge, in the order they are listed; each role sees only what it can use. */
export const NAV: NavItem[] = [
	{ href: '/', label: 'Home', group: 'Daily work', roles: [] },
	{ href: '/instructions', label: 'Instructions', group: 'Daily work', roles: [] },
	{ href: '/calculators', label: 'Calculators', group: 'Daily work', roles: [] },
	{ href: '/messages', label: 'Messages', group: 'Daily work', roles: [] },
	{ href: '/help', label: 'Help', group: 'Daily work', roles: [] },
	{ href: '/training/checks', label: 'My checks', group: 'Training', roles: ['operator'] },
	{ href: '/my-signoffs', label: 'My sign-offs', group: 'Training', roles: ['operator'] },
	{ href: '/certificates', label: 'Certificates', group: 'Training', roles: [] },
	{
		href: '/checks',
		label: 'Knowledge checks',
		group: 'Training',
		roles: ['trainer', 'quality']
	},
	{
		href: '/signoffs',
		label: 'Practical sign-offs',
		group: 'Training',
		roles: ['trainer', 'quality', 'admin']
	},
	{
		href: '/assignments',
		label: 'Assignments',
		group: 'Training',
		roles: ['quality', 'trainer', 'lead', 'admin']
	},
	{ href: '/crew', label: 'Crew', group: 'On the line', roles: ['lead', 'quality', 'admin'] },
	{
		href: '/readiness',
		label: 'Readiness board',
		group: 'On the line',
		roles: ['lead', 'quality', 'admin']
	},
	{
		href: '/supervised-runs',
		label: 'Supervised runs',
		group: 'On the line',
		roles: ['lead', 'quality', 'admin']
	},
	{
		href: '/rules',
		label: 'Certification rules',
		group: 'Quality and records',
		roles: ['quality', 'admin']
	},
	{
		href: '/audit',
		label: 'Audit trail',
		group: 'Quality and records',
		roles: ['quality', 'admin']
	},
	{
		href: '/records',
		label: 'Records',
		group: 'Quality and records',
		roles: ['hr', 'quality', 'admin']
	},
	{ href: '/admin/people', label: 'People', group: 'Plant set-up', roles: ['admin'] },
	{ href: '/admin/plant', label: 'Plant', group: 'Plant set-up', roles: ['admin'] },
	{ href: '/admin/api-keys', label: 'API keys', group: 'Plant set-up', roles: ['admin'] },
	{ href: '/admin/mail', label: 'Mail outbox', group: 'Plant set-up', roles: ['admin'] }
];

export function navFor(roles: readonly Role[]): NavItem[] {
	return NAV.filter((n) => n.roles.length === 0 || n.roles.some((r) => roles.includes(r)));
}

/** The items of navFor, under their headings, in NAV order. */
export function navGroups(items: readonly NavItem[]): { group: NavGroup; items: NavItem[] }[] {
	const groups: { group: NavGroup; items: NavItem[] }[] = [];
	for (const item of items) {
		const last = groups.at(-1);
		if (last?.group === item.group) last.items.push(item);
		else groups.push({ group: item.group, items: [item] });
	}
	return groups;
}
