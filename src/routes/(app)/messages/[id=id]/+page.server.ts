import { error } from '@sveltejs/kit';
import { requireUser } from '$lib/server/auth/guards';
import { messageFor } from '$lib/server/mail/messages';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const user = requireUser(event);
	// Someone else's message answers exactly like one that does not exist.
	const message = await messageFor(user.id, Number(event.params.id));
	if (!message) error(404, { message: 'No such message' });
	return { message };
};
