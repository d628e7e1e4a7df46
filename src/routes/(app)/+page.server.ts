import { requireUser } from '$lib/server/auth/guards';
import { homeFor } from '$lib/server/home';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const user = requireUser(event);
	return { home: await homeFor(user), roles: user.roles };
};
