import { error } from '@sveltejs/kit';
import { requireRole } from '$lib/server/auth/guards';
import { CHECK_VIEWER_ROLES, getCheck, itemStatistics } from '$lib/server/training/checks';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	requireRole(event, ...CHECK_VIEWER_ROLES);
	const check = await getCheck(Number(event.params.id));
	if (!check) error(404, { message: 'No such knowledge check.' });
	return {
		check: { id: check.id, code: check.code, title: check.title },
		stats: await itemStatistics(check.id)
	};
};
