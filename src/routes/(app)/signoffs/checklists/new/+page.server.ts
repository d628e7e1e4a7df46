import { fail, redirect } from '@sveltejs/kit';
import { superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { actorFrom } from '$lib/server/audit';
import { requireRole } from '$lib/server/auth/guards';
import { refuseForm, superValidatePosted } from '$lib/server/forms';
import { createChecklist, listChecklistRevisionChoices } from '$lib/server/training/signoffs';
import { checklistSchema, splitChecklistItems } from '$lib/schemas/signoffs';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	requireRole(event, 'trainer', 'quality');
	return {
		revisions: await listChecklistRevisionChoices(),
		form: await superValidate(zod4(checklistSchema))
	};
};

export const actions: Actions = {
	save: async (event) => {
		const user = requireRole(event, 'trainer', 'quality');
		const form = await superValidatePosted(event.request, zod4(checklistSchema));
		if (!form.valid) return fail(400, { form });
		let id: number;
		try {
			id = await createChecklist(
				{ ...actorFrom(event), id: user.id },
				{ ...form.data, items: splitChecklistItems(form.data.items) }
			);
		} catch (err) {
			return refuseForm(form, err);
		}
		redirect(303, `/signoffs/checklists/${id}`);
	}
};
