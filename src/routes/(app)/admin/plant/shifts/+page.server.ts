import { requireRole } from '$lib/server/auth/guards';
import { listShifts } from '$lib/server/plant';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const admin = requireRole(event, 'admin');
	return { shifts: await listShifts(admin.siteId) };
};
