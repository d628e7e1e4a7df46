import { error, fail } from '@sveltejs/kit';
import { message, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { actorFrom } from '$lib/server/audit';
import { requireRole } from '$lib/server/auth/guards';
import { getLine, updateLine } from '$lib/server/plant';
import { activeActions, activeForm, fieldFailure } from '$lib/server/plant/forms';
import { lineSchema } from '$lib/schemas/plant';
import type { Actions, PageServerLoad } from './$types';
import { superValidatePosted } from '$lib/server/forms';

export const load: PageServerLoad = async (event) => {
	const admin = requireRole(event, 'admin');
	const line = await getLine(Number(event.params.id), admin.siteId);
	if (!line) error(404, { message: 'No such line' });
	return {
		line,
		form: await superValidate(line, zod4(lineSchema), { errors: false }),
		activeForm: await activeForm(),
		created: event.url.searchParams.has('created')
	};
};

export const actions: Actions = {
	save: async (event) => {
		const admin = requireRole(event, 'admin');
		const line = await getLine(Number(event.params.id), admin.siteId);
		if (!line) error(404, { message: 'No such line' });
		const form = await superValidatePosted(event.request, zod4(lineSchema));
		if (!form.valid) return fail(400, { form });
		try {
			const changed = await updateLine(actorFrom(event), line.id, form.data);
			return message(form, changed ? 'Saved.' : 'Nothing changed.');
		} catch (err) {
			return fieldFailure(form, err);
		}
	},
	...activeActions('line', getLine)
};
