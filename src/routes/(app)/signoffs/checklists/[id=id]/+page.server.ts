import { error, fail, redirect } from '@sveltejs/kit';
import { superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { actorFrom } from '$lib/server/audit';
import { requireRole } from '$lib/server/auth/guards';
import { refuseForm, superValidatePosted } from '$lib/server/forms';
import {
	getChecklist,
	listChecklistRevisionChoices,
	retireChecklist,
	updateChecklist
} from '$lib/server/training/signoffs';
import { checklistSchema, retireSchema, splitChecklistItems } from '$lib/schemas/signoffs';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	requireRole(event, 'trainer', 'quality');
	const c = await getChecklist(Number(event.params.id));
	if (!c) error(404, { message: 'No such checklist.' });
	const { processId: _p, revisionId, items, ...rest } = c;
	return {
		checklist: { ...rest, items: items.map((i) => ({ position: i.position, text: i.text })) },
		revisions: await listChecklistRevisionChoices(),
		form: await superValidate(
			{ title: c.title, revisionId, items: items.map((i) => i.text).join('\n') },
			zod4(checklistSchema),
			{ errors: false, id: 'edit' }
		),
		retireForm: await superValidate(zod4(retireSchema), { id: 'retire' })
	};
};

export const actions: Actions = {
	save: async (event) => {
		const user = requireRole(event, 'trainer', 'quality');
		const form = await superValidatePosted(event.request, zod4(checklistSchema), { id: 'edit' });
		if (!form.valid) return fail(400, { form });
		try {
			await updateChecklist({ ...actorFrom(event), id: user.id }, Number(event.params.id), {
				...form.data,
				items: splitChecklistItems(form.data.items)
			});
		} catch (err) {
			return refuseForm(form, err);
		}
		redirect(303, `/signoffs/checklists/${event.params.id}`);
	},
	retire: async (event) => {
		const user = requireRole(event, 'trainer', 'quality');
		const form = await superValidatePosted(event.request, zod4(retireSchema), { id: 'retire' });
		if (!form.valid) return fail(400, { retireForm: form });
		try {
			await retireChecklist(
				{ ...actorFrom(event), id: user.id },
				Number(event.params.id),
				form.data.reason
			);
		} catch (err) {
			return refuseForm(form, err);
		}
		redirect(303, `/signoffs/checklists/${event.params.id}`);
	}
};
