import { fail, redirect } from '@sveltejs/kit';
import { superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { superValidatePosted } from '$lib/server/forms';
import { actorFrom } from '$lib/server/audit';
import { requireRole } from '$lib/server/auth/guards';
import { createStation, stationFormChoices } from '$lib/server/plant';
import { fieldFailure } from '$lib/server/plant/forms';
import { stationSchema } from '$lib/schemas/plant';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const admin = requireRole(event, 'admin');
	const lineId = Number(event.url.searchParams.get('line')) || undefined;
	return {
		form: await superValidate(lineId ? { lineId } : {}, zod4(stationSchema), { errors: false }),
		choices: await stationFormChoices(admin.siteId)
	};
};

export const actions: Actions = {
	save: async (event) => {
		const admin = requireRole(event, 'admin');
		const form = await superValidatePosted(event.request, zod4(stationSchema));
		if (!form.valid) return fail(400, { form });
		let id: number;
		try {
			id = await createStation(actorFrom(event), form.data, admin.siteId);
		} catch (err) {
			return fieldFailure(form, err);
		}
		redirect(303, `/admin/plant/stations/${id}?created=1`);
	}
};
