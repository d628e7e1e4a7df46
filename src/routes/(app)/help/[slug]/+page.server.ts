import { error } from '@sveltejs/kit';
import { requireUser } from '$lib/server/auth/guards';
import { findHelpPage, getHelpExamples, listHelpPages } from '$lib/server/help';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	requireUser(event);
	const page = findHelpPage(event.params.slug);
	if (!page) error(404, { message: 'There is no help page of that name.' });
	return { page, pages: listHelpPages(), examples: await getHelpExamples(page.slug) };
};
