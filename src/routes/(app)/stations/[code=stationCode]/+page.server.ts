import { error } from '@sveltejs/kit';
import { requireUser } from '$lib/server/auth/guards';
import { listStationInstructions } from '$lib/server/instructions';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	requireUser(event);
	const found = await listStationInstructions(event.params.code);
	if (!found) error(404, { message: 'No such station' });
	return found;
};
