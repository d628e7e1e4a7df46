import type { Role } from '../../roles';

/** Trainers, quality and admins may read drafts, reviews and the archive; everyone else only the effective revision. */
export const ARCHIVE_ROLES: Role[] = ['trainer', 'quality', 'admin'];
/** Who may create instructions and write drafts. */
export const AUTHOR_ROLES: Role[] = ['trainer', 'quality'];
/** Who may sign reviews and approvals. */
export const APPROVER_ROLES: Role[] = ['quality'];

export const canSeeArchive = (roles: readonly Role[]) =>
	ARCHIVE_ROLES.some((r) => roles.includes(r));
export const canAuthor = (roles: readonly Role[]) => AUTHOR_ROLES.some((r) => roles.includes(r));
export const canApprove = (roles: readonly Role[]) => APPROVER_ROLES.some((r) => roles.includes(r));
