import { error } from '@sveltejs/kit';
import { requireUser } from '$lib/server/auth/guards';
import { trainingHistory } from '$lib/server/records/history';
import type { PageServerLoad } from './$types';

/** "My records": the signed-in person's own training history (every role has one). */
export const load: PageServerLoad = async (event) => {
	const user = requireUser(event);
	const history = await trainingHistory(user.id);
	if (!history) error(404, { message: 'No such person.' });
	return { history };
};
