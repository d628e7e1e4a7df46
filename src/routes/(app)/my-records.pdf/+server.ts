import { requireUser } from '$lib/server/auth/guards';
import { historyDownload } from '$lib/server/records/history-export';
import type { RequestHandler } from './$types';

/** The signed-in person's own history; no id in the URL, so nobody reaches anyone else's. */
export const GET: RequestHandler = async (event) => {
	const user = requireUser(event);
	return historyDownload(event, user.id, 'pdf', true);
};
