import { requireRole } from '$lib/server/auth/guards';
import { listSignoffs } from '$lib/server/training/signoffs';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const user = requireRole(event, 'trainer', 'quality', 'admin');
	return {
		signoffs: await listSignoffs(user),
		canStart: user.roles.includes('trainer'),
		seesAll: user.roles.some((r) => r === 'quality' || r === 'admin')
	};
};
