import { fail } from '@sveltejs/kit';
import { message, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { actorFrom } from '$lib/server/audit';
import { requireRole } from '$lib/server/auth/guards';
import { refusalToForm, superValidatePosted } from '$lib/server/forms';
import {
	SUPERVISED_RUN_ROLES,
	grantSupervisedRun,
	listSupervisedRuns,
	revokeSupervisedRun,
	supervisedRunChoices,
	untilFromWallClock
} from '$lib/server/gate/supervised';
import { grantSupervisedRunSchema, revokeSupervisedRunSchema } from '$lib/schemas/gate';
import { formatLocal } from '$lib/time';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const user = requireRole(event, ...SUPERVISED_RUN_ROLES);
	const [choices, runs] = await Promise.all([supervisedRunChoices(user), listSupervisedRuns(user)]);
	return {
		choices,
		runs,
		timeZone: user.timeZone,
		form: await superValidate(zod4(grantSupervisedRunSchema), { errors: false })
	};
};

export const actions: Actions = {
	grant: async (event) => {
		const user = requireRole(event, ...SUPERVISED_RUN_ROLES);
		const form = await superValidatePosted(event.request, zod4(grantSupervisedRunSchema));
		if (!form.valid) return fail(400, { form });
		const now = new Date();
		try {
			const run = await grantSupervisedRun(
				actorFrom(event),
				user,
				{ ...form.data, until: untilFromWallClock(form.data.until, user.timeZone, now) },
				now
			);
			return message(
				form,
				`Supervised run granted until ${formatLocal(run.endsAt, user.timeZone)}. The person and the supervisor are told by mail.`
			);
		} catch (err) {
			return refusalToForm(form, err);
		}
	},
	revoke: async (event) => {
		const user = requireRole(event, ...SUPERVISED_RUN_ROLES);
		const revokeForm = await superValidatePosted(event.request, zod4(revokeSupervisedRunSchema), {
			id: 'revoke'
		});
		if (!revokeForm.valid) return fail(400, { revokeForm });
		try {
			await revokeSupervisedRun(
				actorFrom(event),
				user,
				revokeForm.data.runId,
				revokeForm.data.reason
			);
		} catch (err) {
			return refusalToForm(revokeForm, err);
		}
		return { revoked: revokeForm.data.runId };
	}
};
