import { json } from '@sveltejs/kit';
import { requireApiRole } from '$lib/server/auth/guards';
import { getAttemptView } from '$lib/server/training/checks';
import type { RequestHandler } from './$types';

/** One attempt of the signed-in person (never its answer keys); 404 for anybody else's. */
export const GET: RequestHandler = async (event) => {
	const user = requireApiRole(event);
	const attempt = await getAttemptView(user, Number(event.params.id));
	if (!attempt) return json({ error: 'No such attempt.' }, { status: 404 });
	return json({ attempt });
};
