import { requireRole } from '$lib/server/auth/guards';
import { plantMap } from '$lib/server/plant';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const admin = requireRole(event, 'admin');
	return { map: await plantMap(admin.siteId) };
};
