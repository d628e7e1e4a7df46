import { error, fail, redirect } from '@sveltejs/kit';
import { message, setError, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { actorFrom } from '$lib/server/audit';
import { requireRole } from '$lib/server/auth/guards';
import {
	ConflictError,
	getPerson,
	personFormChoices,
	resetSecret,
	updatePerson
} from '$lib/server/people';
import { deactivatePerson, rehirePerson } from '$lib/server/people/leavers';
import { legalHoldsOf } from '$lib/server/records/retention-holds';
import { refuseForm, superValidatePosted } from '$lib/server/forms';
import {
	deactivateSchema,
	personSchema,
	rehireSchema,
	resetSecretSchema,
	type PersonInput
} from '$lib/schemas/people';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const admin = requireRole(event, 'admin');
	const person = await getPerson(Number(event.params.id));
	if (!person) error(404, { message: 'No such person' });
	const { active, hasPassword, hasPin, id, employmentEndedOn, anonymisedAt, ...fields } = person;
	return {
		person: {
			id,
			active,
			hasPassword,
			hasPin,
			displayName: person.displayName,
			employeeNo: person.employeeNo,
			employmentType: person.employmentType,
			contractEndsOn: person.contractEndsOn,
			employmentEndedOn,
			anonymisedAt
		},
		holds: (await legalHoldsOf(id)).map((h) => ({
			id: h.id,
			reason: h.reason,
			placedAt: h.placedAt,
			placedBy: h.placedBy,
			releasedAt: h.releasedAt,
			releasedBy: h.releasedBy
		})),
		timeZone: admin.timeZone,
		form: await superValidate(
			{ ...fields, locale: fields.locale as PersonInput['locale'] },
			zod4(personSchema),
			{
				errors: false
			}
		),
		resetForm: await superValidate(zod4(resetSecretSchema), { id: 'reset' }),
		activeForm: await superValidate(zod4(deactivateSchema), { id: 'active' }),
		rehireForm: await superValidate(zod4(rehireSchema), { id: 'rehire' }),
		choices: await personFormChoices(),
		created: event.url.searchParams.has('created'),
		isSelf: event.locals.user?.id === id
	};
};

async function existing(params: { id: string }) {
	const person = await getPerson(Number(params.id));
	if (!person) error(404, { message: 'No such person' });
	return person;
}

export const actions: Actions = {
	save: async (event) => {
		requireRole(event, 'admin');
		const person = await existing(event.params);
		const form = await superValidatePosted(event.request, zod4(personSchema));
		if (!form.valid) return fail(400, { form });
		try {
			await updatePerson(actorFrom(event), person.id, form.data);
		} catch (err) {
			if (err instanceof ConflictError)
				return setError(form, err.field as 'email', err.message, { status: 409 });
			throw err;
		}
		return message(form, 'Saved.');
	},
	reset: async (event) => {
		requireRole(event, 'admin');
		const person = await existing(event.params);
		const form = await superValidatePosted(event.request, zod4(resetSecretSchema), { id: 'reset' });
		if (!form.valid) return fail(400, { resetForm: form });
		try {
			await resetSecret(
				actorFrom(event),
				person.id,
				form.data.kind,
				form.data.secret,
				form.data.reason
			);
		} catch (err) {
			form.data.secret = '';
			return refuseForm(form, err);
		}
		form.data.secret = '';
		return message(form, form.data.kind === 'pin' ? 'New PIN set.' : 'New password set.');
	},
	deactivate: async (event) => {
		const admin = requireRole(event, 'admin');
		const person = await existing(event.params);
		const form = await superValidatePosted(event.request, zod4(deactivateSchema), { id: 'active' });
		if (!form.valid) return fail(400, { activeForm: form });
		if (person.id === admin.id)
			return message(form, 'You cannot deactivate yourself.', { status: 400 });
		await deactivatePerson(actorFrom(event), person.id, form.data.reason);
		redirect(303, `/admin/people/${person.id}`);
	},
	// A rehire: the same person (id, employee number, history) active again.
	reactivate: async (event) => {
		requireRole(event, 'admin');
		const person = await existing(event.params);
		const form = await superValidatePosted(event.request, zod4(rehireSchema), { id: 'rehire' });
		if (!form.valid) return fail(400, { rehireForm: form });
		try {
			await rehirePerson(actorFrom(event), person.id, form.data);
		} catch (err) {
			return refuseForm(form, err);
		}
		redirect(303, `/admin/people/${person.id}`);
	}
};
