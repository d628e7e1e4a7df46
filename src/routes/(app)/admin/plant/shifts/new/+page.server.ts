import { fail, redirect } from '@sveltejs/kit';
import { superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { actorFrom } from '$lib/server/audit';
import { requireRole } from '$lib/server/auth/guards';
import { createShift } from '$lib/server/plant';
import { fieldFailure } from '$lib/server/plant/forms';
import { shiftSchema } from '$lib/schemas/plant';
import type { Actions, PageServerLoad } from './$types';
import { superValidatePosted } from '$lib/server/forms';

export const load: PageServerLoad = async (event) => {
	requireRole(event, 'admin');
	return { form: await superValidate(zod4(shiftSchema)) };
};

export const actions: Actions = {
	save: async (event) => {
		const admin = requireRole(event, 'admin');
		const form = await superValidatePosted(event.request, zod4(shiftSchema));
		if (!form.valid) return fail(400, { form });
		let id: number;
		try {
			id = await createShift(actorFrom(event), form.data, admin.siteId);
		} catch (err) {
			return fieldFailure(form, err);
		}
		redirect(303, `/admin/plant/shifts/${id}?created=1`);
	}
};
