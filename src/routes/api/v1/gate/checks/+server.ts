import { json } from '@sveltejs/kit';
import { verifyApiKey } from '$lib/server/apikeys';
import { checkStationAccess, withTimeout } from '$lib/server/gate';
import { config } from '$lib/server/config';
import { bodyRefusal, fieldErrors, readJson } from '$lib/server/api';
import { gateCheckSchema } from '$lib/schemas/gate';
import type { RequestHandler } from './$types';

const UNAVAILABLE = {
	decision: 'deny',
	reasons: [{ code: 'unavailable', detail: 'Padbridge could not reach its database in time.' }],
	warnings: [],
	person: null,
	validUntil: null
} as const;

const noKey = () =>
	json(
		{ error: 'A valid station gate API key is required: Authorization: Bearer pbk_…' },
		{ status: 401, headers: { 'WWW-Authenticate': 'Bearer' } }
	);

/** May this badge run this station now? Station API key required; fails closed. */
export const POST: RequestHandler = async (event) => {
	const authorization = event.request.headers.get('authorization');
	const body = await readJson(event.request);
	const parsed = body.ok ? gateCheckSchema.safeParse(body.value) : null;
	if (!parsed?.success) {
		// A malformed request is answered only once the key is known to be good.
		let key;
		try {
			key = await withTimeout(verifyApiKey(authorization, 'gate'), config.gateTimeoutMs);
		} catch {
			return json(UNAVAILABLE, { status: 503 });
		}
		if (!key) return noKey();
		if (!body.ok) return bodyRefusal(body);
		return json(
			{ error: 'Check the request fields.', fields: fieldErrors(parsed!.error) },
			{ status: 400 }
		);
	}
	// The key is verified in the same round trip as the decision's own reads.
	const answer = await checkStationAccess(
		{ ...parsed.data, source: 'api' },
		new Date(),
		verifyApiKey(authorization, 'gate')
	);
	if (answer.unauthorized) return noKey();
	if (answer.wrongStation) {
		return json(
			{ error: `This key belongs to another station; it cannot ask for ${parsed.data.station}.` },
			{ status: 403 }
		);
	}
	const unavailable = answer.reasons[0]?.code === 'unavailable';
	return json(
		{
			decision: answer.decision,
			reasons: answer.reasons,
			warnings: answer.warnings,
			person: answer.person,
			validUntil: answer.validUntil,
			station: answer.station,
			checkedAt: answer.checkedAt,
			checkId: answer.logId
		},
		{ status: unavailable ? 503 : 200 }
	);
};
