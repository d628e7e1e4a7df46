import { error, fail, redirect } from '@sveltejs/kit';
import { actorFrom } from '$lib/server/audit';
import { requireUser } from '$lib/server/auth/guards';
import { Refusal } from '$lib/server/errors';
import { getAttemptView, saveAnswers, submitAttempt } from '$lib/server/training/checks';
import { answersFromForm } from '$lib/schemas/checks';
import type { Actions, PageServerLoad, RequestEvent } from './$types';

export const load: PageServerLoad = async (event) => {
	const user = requireUser(event);
	const attempt = await getAttemptView(user, Number(event.params.id));
	// Another person's attempt reads exactly like one that does not exist.
	if (!attempt) error(404, { message: 'No such attempt.' });
	return { attempt, now: new Date() };
};

const refused = (
	status: number,
	message: string,
	fields: Record<string, string>,
	answers: Record<number, string | string[]>
) => fail(status, { message, fields, answers });

async function post(event: RequestEvent, kind: 'save' | 'submit') {
	const user = requireUser(event);
	const id = Number(event.params.id);
	const answers = answersFromForm(await event.request.formData());
	if (!answers) return refused(400, 'Those answers could not be read.', {}, {});
	const actor = { ...actorFrom(event), id: user.id };
	try {
		if (kind === 'save') {
			const { errors } = await saveAnswers(actor, id, answers, { timeZone: user.timeZone });
			if (Object.keys(errors).length)
				return refused(
					400,
					'Some answers are not numbers; the others were saved.',
					errors,
					answers
				);
			return { saved: true };
		}
		await submitAttempt(actor, id, answers, { timeZone: user.timeZone });
	} catch (err) {
		if (err instanceof Refusal) {
			if (err.status === 404) error(404, { message: err.message });
			return refused(err.status, err.message, err.fields ?? {}, answers);
		}
		throw err;
	}
	redirect(303, `/training/attempts/${id}`);
}

export const actions: Actions = {
	save: (event) => post(event, 'save'),
	submit: (event) => post(event, 'submit')
};
