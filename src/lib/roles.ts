/** The roles of PRODUCT.md §2; a person may hold several. */
export const ROLES = ['operator', 'trainer', 'quality', 'lead', 'hr', 'admin'] as const;
export type Role = (typeof ROLES)[number];

export const ROLE_LABELS: Record<Role, string> = {
	operator: 'Operator',
	trainer: 'Trainer',
	quality: 'Quality',
	lead: 'Line lead',
	hr: 'HR',
	admin: 'Admin'
};

export function hasAnyRole(roles: readonly Role[], wanted: readonly Role[]): boolean {
	return wanted.some((r) => roles.includes(r));
}
