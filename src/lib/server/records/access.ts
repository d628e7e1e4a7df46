// Who may use which part of the Records area: the tabs in src/lib/records/sections.ts say it once,
// and the guards of the pages and downloads read it from there.
import { RECORDS_SECTIONS } from '../../records/sections';
import type { Role } from '../../roles';

function sectionRoles(href: string): Role[] {
	const section = RECORDS_SECTIONS.find((s) => s.href === href);
	if (!section) throw new Error(`no Records section ${href}`);
	return section.roles;
}

/** Training histories of other people (list, screen, PDF, JSON). */
export const HISTORY_ROLES = sectionRoles('/records/people');
/** The gate log and the audit trail export page. */
export const LOGS_ROLES = sectionRoles('/records/logs');
