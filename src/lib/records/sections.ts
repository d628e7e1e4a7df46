import type { Role } from '../roles';

/** The tabs of the Records area; each shows only to the roles that can use it. */
export interface RecordsSection {
	href: string;
	label: string;
	roles: Role[];
}

export const RECORDS_SECTIONS: RecordsSection[] = [
	{ href: '/records', label: 'Training record exports', roles: ['hr', 'quality'] },
	{ href: '/records/people', label: 'Training histories', roles: ['hr', 'quality'] },
	{ href: '/records/logs', label: 'Gate log and audit trail', roles: ['quality', 'hr'] },
	{ href: '/records/retention', label: 'Retention', roles: ['hr', 'admin'] }
];

export function recordsSectionsFor(roles: readonly Role[]): RecordsSection[] {
	return RECORDS_SECTIONS.filter((s) => s.roles.some((r) => roles.includes(r)));
}
