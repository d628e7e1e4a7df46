import { json } from '@sveltejs/kit';
import { actorFrom } from '$lib/server/audit';
import { requireApiRole } from '$lib/server/auth/guards';
import { apiRefusal } from '$lib/server/errors';
import { submitAttempt } from '$lib/server/training/checks';
import { answersJsonSchema } from '$lib/schemas/checks';
import { bodyRefusal, fieldErrors, readJson } from '$lib/server/api';
import type { RequestHandler } from './$types';

/**
 * Submits an attempt once: `{ answers: { "1": "b", "2": ["a", "c"], "3": "127.8" } }` → the
 * score. A second submission answers 409 "already submitted".
 */
export const POST: RequestHandler = async (event) => {
	const user = requireApiRole(event);
	const body = await readJson(event.request);
	if (!body.ok) return bodyRefusal(body);
	const parsed = answersJsonSchema.safeParse(body.value);
	if (!parsed.success)
		return json(
			{
				error: 'Send { answers: { "<position>": answer } } as JSON.',
				fields: fieldErrors(parsed.error)
			},
			{ status: 400 }
		);
	try {
		const r = await submitAttempt(
			{ ...actorFrom(event), id: user.id },
			Number(event.params.id),
			parsed.data.answers,
			{ timeZone: user.timeZone }
		);
		return json({ state: r.state, scorePct: r.scorePct, passed: r.passed });
	} catch (err) {
		return apiRefusal(err);
	}
};
