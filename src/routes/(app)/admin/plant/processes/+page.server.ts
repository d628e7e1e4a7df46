import { requireRole } from '$lib/server/auth/guards';
import { listProcesses } from '$lib/server/plant';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	requireRole(event, 'admin');
	return { processes: await listProcesses() };
};
