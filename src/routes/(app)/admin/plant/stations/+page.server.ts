import { requireRole } from '$lib/server/auth/guards';
import { listStations } from '$lib/server/plant';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const admin = requireRole(event, 'admin');
	return { stations: await listStations(admin.siteId) };
};
