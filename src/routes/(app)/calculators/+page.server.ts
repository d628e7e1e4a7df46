import { requireUser } from '$lib/server/auth/guards';
import { listCalculators } from '$lib/calculators/registry';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = (event) => {
	requireUser(event);
	return {
		calculators: listCalculators().map(({ id, title, description }) => ({ id, title, description }))
	};
};
