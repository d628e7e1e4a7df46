import { requireRole } from '$lib/server/auth/guards';
import { listPeople } from '$lib/server/people';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	requireRole(event, 'admin');
	return { people: await listPeople() };
};
