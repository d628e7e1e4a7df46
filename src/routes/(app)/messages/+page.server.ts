import { requireUser } from '$lib/server/auth/guards';
import { messagesFor } from '$lib/server/mail/messages';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const user = requireUser(event);
	return { messages: await messagesFor(user.id) };
};
