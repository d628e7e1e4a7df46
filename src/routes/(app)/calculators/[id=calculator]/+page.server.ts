import { requireUser } from '$lib/server/auth/guards';
import { calculators, type CalculatorId } from '$lib/calculators/registry';
import { formValuesFromQuery } from '$lib/calculators/form-values';
import type { PageServerLoad } from './$types';

// The form values come from the query, so a share link and a form sent without JavaScript both
// render their results on the server.
export const load: PageServerLoad = (event) => {
	requireUser(event);
	const def = calculators[event.params.id as CalculatorId];
	return { id: def.id, initial: formValuesFromQuery(def, event.url.searchParams) };
};
