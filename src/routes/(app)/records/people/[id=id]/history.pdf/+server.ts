import { requireRole } from '$lib/server/auth/guards';
import { HISTORY_ROLES } from '$lib/server/records/access';
import { historyDownload } from '$lib/server/records/history-export';
import type { RequestHandler } from './$types';

export const GET: RequestHandler = async (event) => {
	requireRole(event, ...HISTORY_ROLES);
	return historyDownload(event, Number(event.params.id), 'pdf', false);
};
