import { requireUser } from '$lib/server/auth/guards';
import { listHelpPages } from '$lib/server/help';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = (event) => {
	requireUser(event);
	return { pages: listHelpPages() };
};
