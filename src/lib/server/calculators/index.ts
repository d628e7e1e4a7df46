import { json } from '@sveltejs/kit';
import { CALCULATOR_CAUTION, listCalculators } from '../../calculators/registry';

/** The registry as the API lists it: ids, titles, inputs with units and ranges, outputs, sources. */
export function describeCalculators() {
	return {
		caution: CALCULATOR_CAUTION,
		calculators: listCalculators().map((def) => ({
			id: def.id,
			title: def.title,
			description: def.description,
			endpoint: `/api/v1/calculators/${def.id}`,
			inputs: def.inputs,
			outputs: def.outputs,
			method: def.method,
			sources: def.sources,
			safety: def.safety
		}))
	};
}

/** A JSON error in the API's shape, `{ error, fields? }`. */
export function apiError(
	status: number,
	error: string,
	fields?: Record<string, string>,
	headers?: Record<string, string>
): Response {
	return json(fields ? { error, fields } : { error }, { status, headers });
}

export function unauthorized(): Response {
	return apiError(
		401,
		'Sign in, or send an API key with the calculators scope as "Authorization: Bearer <key>".',
		undefined,
		{ 'WWW-Authenticate': 'Bearer realm="padbridge"' }
	);
}

// Calculator inputs are a few hundred bytes; a profile of 50 segments is still under 4 kB.
const MAX_BODY_BYTES = 64 * 1024;

export type JsonBody = { ok: true; value: unknown } | { ok: false; response: Response };

/** Reads a JSON request body: 415 for another content type, 413 when too big, 400 when not JSON. */
export async function readJsonBody(request: Request): Promise<JsonBody> {
	const type = (request.headers.get('content-type') ?? '').split(';')[0].trim().toLowerCase();
	if (type !== 'application/json' && !/^application\/[a-z0-9.+-]+\+json$/.test(type)) {
		return {
			ok: false,
			response: apiError(415, 'Send the inputs as JSON with "Content-Type: application/json".')
		};
	}
	const declared = Number(request.headers.get('content-length') ?? 0);
	const tooBig = () =>
		apiError(413, `The request body is larger than ${MAX_BODY_BYTES / 1024} kB.`);
	if (declared > MAX_BODY_BYTES) return { ok: false, response: tooBig() };
	const text = await request.text();
	if (new TextEncoder().encode(text).length > MAX_BODY_BYTES) {
		return { ok: false, response: tooBig() };
	}
	try {
		return { ok: true, value: JSON.parse(text) };
	} catch {
		return {
			ok: false,
			response: apiError(400, 'The request body is not valid JSON.', {})
		};
	}
}
