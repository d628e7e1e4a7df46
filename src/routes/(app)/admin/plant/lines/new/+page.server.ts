import { fail, redirect } from '@sveltejs/kit';
import { superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { actorFrom } from '$lib/server/audit';
import { requireRole } from '$lib/server/auth/guards';
import { createLine } from '$lib/server/plant';
import { fieldFailure } from '$lib/server/plant/forms';
import { lineSchema } from '$lib/schemas/plant';
import type { Actions, PageServerLoad } from './$types';
import { superValidatePosted } from '$lib/server/forms';

export const load: PageServerLoad = async (event) => {
	requireRole(event, 'admin');
	return { form: await superValidate(zod4(lineSchema)) };
};

export const actions: Actions = {
	save: async (event) => {
		const admin = requireRole(event, 'admin');
		const form = await superValidatePosted(event.request, zod4(lineSchema));
		if (!form.valid) return fail(400, { form });
		let id: number;
		try {
			id = await createLine(actorFrom(event), form.data, admin.siteId);
		} catch (err) {
			return fieldFailure(form, err);
		}
		redirect(303, `/admin/plant/lines/${id}?created=1`);
	}
};
