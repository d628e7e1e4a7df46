import { fail, redirect } from '@sveltejs/kit';
import { superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { actorFrom } from '$lib/server/audit';
import { requireUser } from '$lib/server/auth/guards';
import { pageRefusal, Refusal } from '$lib/server/errors';
import { postedFormData, refuseForm, superValidatePosted } from '$lib/server/forms';
import {
	countersignSignoff,
	getSignoffForViewer,
	saveSignoffItem,
	signSignoff
} from '$lib/server/training/signoffs';
import { countersignSchema, signoffItemSchema, trainerSignSchema } from '$lib/schemas/signoffs';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const user = requireUser(event);
	const signoff = await getSignoffForViewer(user, Number(event.params.id)).catch(pageRefusal);
	return {
		signoff,
		signForm: await superValidate(zod4(trainerSignSchema), { id: 'sign' }),
		countersignForm: await superValidate(zod4(countersignSchema), { id: 'countersign' })
	};
};

export const actions: Actions = {
	item: async (event) => {
		const user = requireUser(event);
		// The step is in the URL too: a body over the server-wide limit cannot be read at all, and
		// its refusal still belongs under that step's photo field.
		const step = Number(event.url.searchParams.get('step'));
		const body = await postedFormData(event.request);
		if (!body)
			return fail(413, {
				item: {
					itemId: Number.isSafeInteger(step) ? step : 0,
					result: undefined,
					comment: undefined,
					errors: {
						photo:
							'The upload is larger than the server accepts, so nothing of this step was saved. Choose a photo of at most 10 MB and save the step again.'
					} as Record<string, string | undefined>
				}
			});
		const form = await superValidatePosted(body, zod4(signoffItemSchema));
		const values = {
			itemId: form.data.itemId,
			result: form.data.result,
			comment: form.data.comment
		};
		const errors = (e: Record<string, string | undefined>) => ({ item: { ...values, errors: e } });
		if (!form.valid)
			return fail(
				400,
				errors({
					result: form.errors.result?.[0],
					comment: form.errors.comment?.[0],
					photo: form.errors.photo?.[0]
				})
			);
		try {
			await saveSignoffItem(
				{ ...actorFrom(event), id: user.id, roles: user.roles },
				Number(event.params.id),
				{
					...form.data,
					photo: form.data.photo ?? null
				}
			);
		} catch (err) {
			if (!(err instanceof Refusal)) throw err;
			if (err.status === 404) pageRefusal(err);
			return fail(err.status, errors({ ...err.fields, message: err.message }));
		}
		return { saved: form.data.itemId };
	},
	sign: async (event) => {
		const user = requireUser(event);
		const form = await superValidatePosted(event.request, zod4(trainerSignSchema), { id: 'sign' });
		if (!form.valid) return fail(400, { signForm: form });
		const { password } = form.data;
		form.data.password = '';
		try {
			await signSignoff(
				{ ...actorFrom(event), id: user.id, roles: user.roles },
				Number(event.params.id),
				password
			);
		} catch (err) {
			if (err instanceof Refusal && err.status === 404) pageRefusal(err);
			return refuseForm(form, err);
		}
		redirect(303, `/signoffs/${event.params.id}`);
	},
	countersign: async (event) => {
		const user = requireUser(event);
		const form = await superValidatePosted(event.request, zod4(countersignSchema), {
			id: 'countersign'
		});
		if (!form.valid) return fail(400, { countersignForm: form });
		const { password } = form.data;
		form.data.password = '';
		try {
			await countersignSignoff(
				{ ...actorFrom(event), id: user.id, roles: user.roles },
				Number(event.params.id),
				password
			);
		} catch (err) {
			if (err instanceof Refusal && err.status === 404) pageRefusal(err);
			return refuseForm(form, err);
		}
		redirect(303, `/signoffs/${event.params.id}?countersigned=1`);
	}
};
