import { requireUser } from '$lib/server/auth/guards';
import { listMySignoffs } from '$lib/server/training/signoffs';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const user = requireUser(event);
	return await listMySignoffs(user.id);
};
