import { fail, redirect } from '@sveltejs/kit';
import { setError, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { actorFrom } from '$lib/server/audit';
import { requireRole } from '$lib/server/auth/guards';
import { ConflictError, createPerson, personFormChoices } from '$lib/server/people';
import { personSchema } from '$lib/schemas/people';
import type { Actions, PageServerLoad } from './$types';
import { superValidatePosted } from '$lib/server/forms';

export const load: PageServerLoad = async (event) => {
	requireRole(event, 'admin');
	return {
		form: await superValidate(zod4(personSchema)),
		choices: await personFormChoices()
	};
};

export const actions: Actions = {
	save: async (event) => {
		const admin = requireRole(event, 'admin');
		const form = await superValidatePosted(event.request, zod4(personSchema));
		if (!form.valid) return fail(400, { form });
		let id: number;
		try {
			id = await createPerson(actorFrom(event), form.data, admin.siteId);
		} catch (err) {
			if (err instanceof ConflictError)
				return setError(form, err.field as 'email', err.message, { status: 409 });
			throw err;
		}
		redirect(303, `/admin/people/${id}?created=1`);
	}
};
