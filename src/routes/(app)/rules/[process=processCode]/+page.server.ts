import { error, fail, redirect } from '@sveltejs/kit';
import { superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { actorFrom } from '$lib/server/audit';
import { requireRole } from '$lib/server/auth/guards';
import { refusalToForm, superValidatePosted } from '$lib/server/forms';
import {
	createRuleVersion,
	nextVersionDefaults,
	processByCode,
	ruleFormChoices,
	ruleHistory
} from '$lib/server/training/rules';
import { ruleSchema } from '$lib/schemas/training';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const user = requireRole(event, 'quality', 'admin');
	const process = await processByCode(event.params.process);
	if (!process) error(404, { message: 'No such process' });
	const canEdit = user.roles.includes('quality');
	return {
		process,
		canEdit,
		history: await ruleHistory(process.id),
		choices: canEdit ? await ruleFormChoices(process.id) : null,
		form: canEdit
			? await superValidate(await nextVersionDefaults(process.id), zod4(ruleSchema), {
					errors: false
				})
			: null,
		saved: Number(event.url.searchParams.get('saved')) || null
	};
};

export const actions: Actions = {
	save: async (event) => {
		const user = requireRole(event, 'quality');
		const process = await processByCode(event.params.process);
		if (!process) error(404, { message: 'No such process' });
		const form = await superValidatePosted(event.request, zod4(ruleSchema));
		if (!form.valid) return fail(400, { form });
		let version: number;
		try {
			({ version } = await createRuleVersion(actorFrom(event), process.id, form.data, {
				timeZone: user.timeZone
			}));
		} catch (err) {
			return refusalToForm(form, err);
		}
		redirect(303, `/rules/${process.code}?saved=${version}`);
	}
};
