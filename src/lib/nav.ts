import type { Role } from './roles';

export interface NavItem {
	href: string;
	label: string;
	/** Shown to anyone holding one of these roles; empty means every signed-in person. */
	roles: Role[];
}

/** The areas of Padbridge; each role sees only what it can use. */
export const NAV: NavItem[] = [
	{ href: '/', label: 'Home', roles: [] },
	{ href: '/instructions', label: 'Instructions', roles: [] },
	{ href: '/certificates', label: 'Certificates', roles: [] },
	{ href: '/my-signoffs', label: 'My sign-offs', roles: ['operator'] },
	{ href: '/signoffs', label: 'Practical sign-offs', roles: ['trainer', 'quality', 'admin'] },
	{ href: '/calculators', label: 'Calculators', roles: [] },
	{ href: '/messages', label: 'Messages', roles: [] },
	{ href: '/help', label: 'Help', roles: [] },
	{ href: '/training/checks', label: 'My checks', roles: ['operator'] },
	{ href: '/checks', label: 'Knowledge checks', roles: ['trainer', 'quality'] },
	{ href: '/rules', label: 'Certification rules', roles: ['quality', 'admin'] },
	{ href: '/assignments', label: 'Assignments', roles: ['quality', 'trainer', 'lead', 'admin'] },
	{ href: '/crew', label: 'Crew', roles: ['lead', 'quality', 'admin'] },
	{ href: '/readiness', label: 'Readiness board', roles: ['lead', 'quality', 'admin'] },
	{ href: '/supervised-runs', label: 'Supervised runs', roles: ['lead', 'quality', 'admin'] },
	{ href: '/audit', label: 'Audit trail', roles: ['quality', 'admin'] },
	{ href: '/records', label: 'Records', roles: ['hr', 'quality', 'admin'] },
	{ href: '/admin/people', label: 'People', roles: ['admin'] },
	{ href: '/admin/plant', label: 'Plant', roles: ['admin'] },
	{ href: '/admin/api-keys', label: 'API keys', roles: ['admin'] }
];

export function navFor(roles: readonly Role[]): NavItem[] {
	return NAV.filter((n) => n.roles.length === 0 || n.roles.some((r) => roles.includes(r)));
}
