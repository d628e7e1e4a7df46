import { error, fail, redirect } from '@sveltejs/kit';
import { actorFrom } from '$lib/server/audit';
import { requireUser } from '$lib/server/auth/guards';
import { Refusal } from '$lib/server/errors';
import { listChecksForPerson, startAttempt } from '$lib/server/training/checks';
import { startSchema } from '$lib/schemas/checks';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const user = requireUser(event);
	return { checks: await listChecksForPerson(user.id), now: new Date() };
};

export const actions: Actions = {
	start: async (event) => {
		const user = requireUser(event);
		const parsed = startSchema.safeParse(Object.fromEntries(await event.request.formData()));
		if (!parsed.success)
			return fail(400, { message: 'Choose a knowledge check to start.', processId: 0 });
		let id: number;
		try {
			({ id } = await startAttempt({ ...actorFrom(event), id: user.id }, parsed.data.processId, {
				timeZone: user.timeZone
			}));
		} catch (err) {
			if (err instanceof Refusal) {
				if (err.status === 404) error(404, { message: err.message });
				return fail(err.status, { message: err.message, processId: parsed.data.processId });
			}
			throw err;
		}
		redirect(303, `/training/attempts/${id}`);
	}
};
