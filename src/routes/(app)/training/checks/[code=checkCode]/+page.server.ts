import { error } from '@sveltejs/kit';
import { requireUser } from '$lib/server/auth/guards';
import { listChecksForPerson } from '$lib/server/training/checks';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const user = requireUser(event);
	const check = (await listChecksForPerson(user.id)).find((c) => c.code === event.params.code);
	if (!check) error(404, { message: 'This knowledge check is not asked of you right now.' });
	return { check, now: new Date() };
};
