import { requireRole } from '$lib/server/auth/guards';
import { readinessChoices } from '$lib/server/readiness';
import { READINESS_ROLES } from '$lib/server/readiness/http';
import { reachableLines } from '$lib/server/training/assignments';
import type { PageServerLoad } from './$types';

// Only the filter choices: the board itself is fetched by the browser from /api/v1/readiness,
// so a station display refreshes it without reloading the page.
export const load: PageServerLoad = async (event) => {
	const user = requireRole(event, ...READINESS_ROLES);
	return readinessChoices(await reachableLines(user), user.siteId);
};
