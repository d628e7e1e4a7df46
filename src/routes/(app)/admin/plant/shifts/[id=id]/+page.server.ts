import { error, fail } from '@sveltejs/kit';
import { message, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { actorFrom } from '$lib/server/audit';
import { requireRole } from '$lib/server/auth/guards';
import { getShift, updateShift } from '$lib/server/plant';
import { fieldFailure } from '$lib/server/plant/forms';
import { shiftSchema } from '$lib/schemas/plant';
import type { Actions, PageServerLoad } from './$types';
import { superValidatePosted } from '$lib/server/forms';

export const load: PageServerLoad = async (event) => {
	const admin = requireRole(event, 'admin');
	const shift = await getShift(Number(event.params.id), admin.siteId);
	if (!shift) error(404, { message: 'No such shift' });
	return {
		shift,
		form: await superValidate(shift, zod4(shiftSchema), { errors: false }),
		created: event.url.searchParams.has('created')
	};
};

export const actions: Actions = {
	save: async (event) => {
		const admin = requireRole(event, 'admin');
		const shift = await getShift(Number(event.params.id), admin.siteId);
		if (!shift) error(404, { message: 'No such shift' });
		const form = await superValidatePosted(event.request, zod4(shiftSchema));
		if (!form.valid) return fail(400, { form });
		try {
			const changed = await updateShift(actorFrom(event), shift.id, form.data);
			return message(form, changed ? 'Saved.' : 'Nothing changed.');
		} catch (err) {
			return fieldFailure(form, err);
		}
	}
};
