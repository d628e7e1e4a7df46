import { error } from '@sveltejs/kit';
import { requireRole } from '$lib/server/auth/guards';
import { getRetentionRun } from '$lib/server/records/retention';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const user = requireRole(event, 'hr', 'admin');
	const run = await getRetentionRun(Number(event.params.id));
	if (!run) error(404, { message: 'No such retention run.' });
	return { run, timeZone: user.timeZone, canOpenPeople: user.roles.includes('admin') };
};
