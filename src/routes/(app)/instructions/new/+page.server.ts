import { Refusal } from '$lib/server/errors';
import { fail, redirect } from '@sveltejs/kit';
import { setError, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { actorFrom } from '$lib/server/audit';
import { requireRole } from '$lib/server/auth/guards';
import { AUTHOR_ROLES, createInstruction, listInstructionChoices } from '$lib/server/instructions';
import { newInstructionSchema } from '$lib/schemas/instructions';
import type { Actions, PageServerLoad } from './$types';
import { superValidatePosted } from '$lib/server/forms';

const TEMPLATE = `# Purpose

What this instruction makes sure of, in one sentence.

> **Caution:** name the hazards at this step (hot heads, pinch points, IPA, ESD).

## Steps

1. First step.
2. Second step.
`;

export const load: PageServerLoad = async (event) => {
	requireRole(event, ...AUTHOR_ROLES);
	return {
		form: await superValidate(zod4(newInstructionSchema)),
		choices: await listInstructionChoices()
	};
};

export const actions: Actions = {
	default: async (event) => {
		const user = requireRole(event, ...AUTHOR_ROLES);
		const form = await superValidatePosted(event.request, zod4(newInstructionSchema));
		if (!form.valid) return fail(400, { form });
		try {
			await createInstruction(
				{ ...actorFrom(event), id: user.id },
				{ ...form.data, source: TEMPLATE }
			);
		} catch (err) {
			if (err instanceof Refusal && err.fields?.docNumber)
				return setError(form, 'docNumber', err.fields.docNumber, { status: 409 });
			throw err;
		}
		redirect(303, `/instructions/${form.data.docNumber}/revisions/A/edit`);
	}
};
