import { json } from '@sveltejs/kit';
import { isCalculatorId, runCalculator } from '$lib/calculators/registry';
import { identifyApiCaller } from '$lib/server/apikeys';
import { apiError, describeCalculators, readJsonBody, unauthorized } from '$lib/server/calculators';
import type { RequestHandler } from './$types';

const unknown = (id: string) =>
	apiError(404, `Unknown calculator "${id}". GET /api/v1/calculators lists them.`);

/** Runs one calculator on JSON inputs: `{ outputs, warnings }`, or 400 `{ error, fields }`. */
export const POST: RequestHandler = async (event) => {
	if (!(await identifyApiCaller(event, 'calculators'))) return unauthorized();
	const { id } = event.params;
	if (!isCalculatorId(id)) return unknown(id);
	const body = await readJsonBody(event.request);
	if (!body.ok) return body.response;
	const result = runCalculator(id, body.value);
	if (!result.ok) return apiError(400, result.error, result.fields);
	return json({ outputs: result.outputs, warnings: result.warnings });
};

/** One calculator's entry of the registry. */
export const GET: RequestHandler = async (event) => {
	if (!(await identifyApiCaller(event, 'calculators'))) return unauthorized();
	const entry = describeCalculators().calculators.find((c) => c.id === event.params.id);
	return entry ? json(entry) : unknown(event.params.id);
};
