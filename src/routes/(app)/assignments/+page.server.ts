import { fail } from '@sveltejs/kit';
import { message, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { actorFrom } from '$lib/server/audit';
import { requireRole } from '$lib/server/auth/guards';
import { refusalToForm, superValidatePosted } from '$lib/server/forms';
import {
	ASSIGNER_ROLES,
	assignProcess,
	assignmentChoices,
	closeAssignment,
	listOpenAssignments
} from '$lib/server/training/assignments';
import { assignSchema, assignmentFilterSchema, closeAssignmentSchema } from '$lib/schemas/training';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const user = requireRole(event, ...ASSIGNER_ROLES);
	const filter = assignmentFilterSchema.parse(Object.fromEntries(event.url.searchParams));
	const [choices, open] = await Promise.all([
		assignmentChoices(user),
		listOpenAssignments(user, {
			lineId: filter.line,
			processId: filter.process,
			overdue: filter.overdue
		})
	]);
	return {
		choices,
		open,
		filter,
		// A lead has one line: it is the default target.
		form: await superValidate(
			{
				scope: 'line' as const,
				lineId: choices.lines.length === 1 ? choices.lines[0].id : null
			},
			zod4(assignSchema),
			{ errors: false }
		)
	};
};

export const actions: Actions = {
	assign: async (event) => {
		const user = requireRole(event, ...ASSIGNER_ROLES);
		const form = await superValidatePosted(event.request, zod4(assignSchema));
		if (!form.valid) return fail(400, { form });
		try {
			const r = await assignProcess(actorFrom(event), user, form.data);
			return message(
				form,
				`${r.process} for ${r.label}: assigned ${r.assigned}, already assigned ${r.alreadyAssigned}.`
			);
		} catch (err) {
			return refusalToForm(form, err);
		}
	},
	close: async (event) => {
		const user = requireRole(event, ...ASSIGNER_ROLES);
		const closeForm = await superValidatePosted(event.request, zod4(closeAssignmentSchema), {
			id: 'close'
		});
		if (!closeForm.valid) return fail(400, { closeForm });
		try {
			await closeAssignment(
				actorFrom(event),
				user,
				closeForm.data.assignmentId,
				closeForm.data.reason
			);
		} catch (err) {
			return refusalToForm(closeForm, err);
		}
		return { closed: closeForm.data.assignmentId };
	}
};
