import { fail, redirect } from '@sveltejs/kit';
import { superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { actorFrom } from '$lib/server/audit';
import { requireRole } from '$lib/server/auth/guards';
import { refuseForm, superValidatePosted } from '$lib/server/forms';
import { findPeopleToObserve, listStartChoices, startSignoff } from '$lib/server/training/signoffs';
import { personSearchSchema, startSignoffSchema } from '$lib/schemas/signoffs';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	requireRole(event, 'trainer');
	const search = await superValidate(event.url, zod4(personSearchSchema), { id: 'search' });
	const q = search.valid ? search.data.q : '';
	return {
		q,
		people: await findPeopleToObserve(q),
		choices: await listStartChoices(),
		form: await superValidate(zod4(startSignoffSchema), { id: 'start' })
	};
};

export const actions: Actions = {
	start: async (event) => {
		const user = requireRole(event, 'trainer');
		const form = await superValidatePosted(event.request, zod4(startSignoffSchema), {
			id: 'start'
		});
		if (!form.valid) return fail(400, { form });
		let id: number;
		try {
			id = await startSignoff({ ...actorFrom(event), id: user.id }, form.data);
		} catch (err) {
			return refuseForm(form, err);
		}
		redirect(303, `/signoffs/${id}`);
	}
};
