import { fail, redirect } from '@sveltejs/kit';
import { superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { actorFrom } from '$lib/server/audit';
import { requireRole, requireUser } from '$lib/server/auth/guards';
import { pageRefusal } from '$lib/server/errors';
import { refuseForm, superValidatePosted } from '$lib/server/forms';
import {
	CERTIFICATE_MANAGER_ROLES,
	changeCertificateState,
	getCertificateForViewer,
	type StateAction
} from '$lib/server/certificates/register';
import { certificateStateSchema } from '$lib/schemas/signoffs';
import type { Actions, PageServerLoad, RequestEvent } from './$types';

export const load: PageServerLoad = async (event) => {
	const user = requireUser(event);
	const certificate = await getCertificateForViewer(user, Number(event.params.id)).catch(
		pageRefusal
	);
	return {
		certificate,
		stateForm: await superValidate(zod4(certificateStateSchema), { id: 'state' })
	};
};

function stateAction(action: StateAction) {
	return async (event: RequestEvent) => {
		const user = requireRole(event, ...CERTIFICATE_MANAGER_ROLES);
		const form = await superValidatePosted(event.request, zod4(certificateStateSchema), {
			id: 'state'
		});
		if (!form.valid) return fail(400, { stateForm: form, action });
		try {
			await changeCertificateState(
				{ ...actorFrom(event), id: user.id },
				Number(event.params.id),
				action,
				form.data.reason
			);
		} catch (err) {
			return refuseForm(form, err);
		}
		redirect(303, `/certificates/${event.params.id}`);
	};
}

export const actions: Actions = {
	suspend: stateAction('suspend'),
	reinstate: stateAction('reinstate'),
	withdraw: stateAction('withdraw')
};
