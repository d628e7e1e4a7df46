import { requireUser } from '$lib/server/auth/guards';
import { navFor } from '$lib/nav';
import type { LayoutServerLoad } from './$types';

export const load: LayoutServerLoad = (event) => {
	const user = requireUser(event);
	return {
		user: { displayName: user.displayName, roles: user.roles, timeZone: user.timeZone },
		nav: navFor(user.roles)
	};
};
