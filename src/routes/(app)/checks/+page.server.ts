import { fail, redirect } from '@sveltejs/kit';
import { setError, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { actorFrom } from '$lib/server/audit';
import { requireRole } from '$lib/server/auth/guards';
import { Refusal } from '$lib/server/errors';
import {
	CHECK_AUTHOR_ROLES,
	CHECK_VIEWER_ROLES,
	createCheck,
	listChecks,
	listProcessChoices
} from '$lib/server/training/checks';
import { newCheckSchema } from '$lib/schemas/checks';
import type { Actions, PageServerLoad } from './$types';
import { superValidatePosted } from '$lib/server/forms';

export const load: PageServerLoad = async (event) => {
	const user = requireRole(event, ...CHECK_VIEWER_ROLES);
	return {
		checks: await listChecks(),
		processes: await listProcessChoices(),
		canAuthor: user.roles.includes('trainer'),
		form: await superValidate(zod4(newCheckSchema))
	};
};

export const actions: Actions = {
	create: async (event) => {
		const user = requireRole(event, ...CHECK_AUTHOR_ROLES);
		const form = await superValidatePosted(event.request, zod4(newCheckSchema));
		if (!form.valid) return fail(400, { form });
		let created: { id: number; versionId: number };
		try {
			created = await createCheck({ ...actorFrom(event), id: user.id }, form.data);
		} catch (err) {
			if (err instanceof Refusal && err.fields?.code)
				return setError(form, 'code', err.fields.code, { status: err.status });
			if (err instanceof Refusal && err.fields?.processId)
				return setError(form, 'processId', err.fields.processId, { status: err.status });
			throw err;
		}
		redirect(303, `/checks/${created.id}/versions/${created.versionId}`);
	}
};
