import { requireRole } from '$lib/server/auth/guards';
import { listChecklists } from '$lib/server/training/signoffs';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	requireRole(event, 'trainer', 'quality');
	return { checklists: await listChecklists() };
};
