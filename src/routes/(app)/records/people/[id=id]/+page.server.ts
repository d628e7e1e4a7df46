import { error } from '@sveltejs/kit';
import { requireRole } from '$lib/server/auth/guards';
import { HISTORY_ROLES } from '$lib/server/records/access';
import { trainingHistory } from '$lib/server/records/history';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	requireRole(event, ...HISTORY_ROLES);
	const history = await trainingHistory(Number(event.params.id));
	if (!history) error(404, { message: 'No such person.' });
	return { history };
};
