import { requireRole } from '$lib/server/auth/guards';
import { listLines } from '$lib/server/plant';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const admin = requireRole(event, 'admin');
	return { lines: await listLines(admin.siteId) };
};
