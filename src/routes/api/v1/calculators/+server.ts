import { json } from '@sveltejs/kit';
import { identifyApiCaller } from '$lib/server/apikeys';
import { describeCalculators, unauthorized } from '$lib/server/calculators';
import type { RequestHandler } from './$types';

export const GET: RequestHandler = async (event) => {
	if (!(await identifyApiCaller(event, 'calculators'))) return unauthorized();
	return json(describeCalculators());
};
