import { error } from '@sveltejs/kit';
import { requireRole } from '$lib/server/auth/guards';
import { crewProgress } from '$lib/server/training/crew';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const user = requireRole(event, 'lead', 'quality', 'admin');
	const asked = Number(event.url.searchParams.get('line')) || null;
	const crew = await crewProgress(user, asked);
	// A line outside the viewer's reach is answered like one that does not exist.
	if (asked && !crew.line) error(404, { message: 'No such line' });
	return crew;
};
