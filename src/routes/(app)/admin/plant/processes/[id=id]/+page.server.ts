import { error, fail } from '@sveltejs/kit';
import { message, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { actorFrom } from '$lib/server/audit';
import { requireRole } from '$lib/server/auth/guards';
import { getProcess, updateProcess } from '$lib/server/plant';
import { activeActions, activeForm, fieldFailure } from '$lib/server/plant/forms';
import { processSchema } from '$lib/schemas/plant';
import type { Actions, PageServerLoad } from './$types';
import { superValidatePosted } from '$lib/server/forms';

export const load: PageServerLoad = async (event) => {
	requireRole(event, 'admin');
	const process = await getProcess(Number(event.params.id));
	if (!process) error(404, { message: 'No such process' });
	return {
		process,
		form: await superValidate(process, zod4(processSchema), { errors: false }),
		activeForm: await activeForm(),
		created: event.url.searchParams.has('created')
	};
};

export const actions: Actions = {
	save: async (event) => {
		requireRole(event, 'admin');
		const process = await getProcess(Number(event.params.id));
		if (!process) error(404, { message: 'No such process' });
		const form = await superValidatePosted(event.request, zod4(processSchema));
		if (!form.valid) return fail(400, { form });
		try {
			const changed = await updateProcess(actorFrom(event), process.id, form.data);
			return message(form, changed ? 'Saved.' : 'Nothing changed.');
		} catch (err) {
			return fieldFailure(form, err);
		}
	},
	...activeActions('process', getProcess)
};
