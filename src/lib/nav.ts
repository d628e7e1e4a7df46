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
	{ href: '/calculators', label: 'Calculators', roles: [] },
	{ href: '/messages', label: 'Messages', roles: [] },
	{ href: '/help', label: 'Help', roles: [] },
	{ href: '/audit', label: 'Audit trail', roles: ['quality', 'admin'] },
	{ href: '/admin/people', label: 'People', roles: ['admin'] },
	{ href: '/admin/plant', label: 'Plant', roles: ['admin'] },
	{ href: '/admin/api-keys', label: 'API keys', roles: ['admin'] }
];

export function navFor(roles: readonly Role[]): NavItem[] {
	return NAV.filter((n) => n.roles.length === 0 || n.roles.some((r) => roles.includes(r)));
}
