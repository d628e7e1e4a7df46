import { error, fail, redirect } from '@sveltejs/kit';
import { message, setError, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { superValidatePosted } from '$lib/server/forms';
import { z } from 'zod';
import { actorFrom } from '$lib/server/audit';
import { requireRole } from '$lib/server/auth/guards';
import { Refusal } from '$lib/server/errors';
import {
	CHECK_APPROVER_ROLES,
	CHECK_AUTHOR_ROLES,
	CHECK_VIEWER_ROLES,
	approveVersion,
	getCheck,
	getVersion,
	listRevisionChoices,
	removeQuestion,
	returnVersion,
	submitVersion,
	updateVersionSettings,
	verifyVersionSignatures
} from '$lib/server/training/checks';
import { approveSchema, returnSchema, versionSettingsSchema } from '$lib/schemas/checks';
import type { Actions, PageServerLoad, RequestEvent } from './$types';

async function versionOf(event: RequestEvent | Parameters<PageServerLoad>[0]) {
	const check = await getCheck(Number(event.params.id));
	const version = check && (await getVersion(check.id, Number(event.params.v)));
	if (!check || !version) error(404, { message: 'No such knowledge check version.' });
	return { check, version };
}

const here = (event: RequestEvent) => `/checks/${event.params.id}/versions/${event.params.v}`;
const actorOf = (event: RequestEvent, id: number) => ({ ...actorFrom(event), id });

export const load: PageServerLoad = async (event) => {
	const user = requireRole(event, ...CHECK_VIEWER_ROLES);
	const { check, version } = await versionOf(event);
	const { questions, authorId, ...settings } = version;
	return {
		check: { id: check.id, code: check.code, title: check.title, processCode: check.processCode },
		version: { ...settings, isMine: authorId === user.id },
		questions,
		revisions: await listRevisionChoices(check.processId),
		signatures: await verifyVersionSignatures(version.id),
		canEdit: user.roles.includes('trainer') && version.state === 'draft',
		canApprove: user.roles.includes('quality') && version.state === 'in_review',
		settingsForm: await superValidate(
			{
				questionsPerAttempt: version.questionsPerAttempt,
				timeLimitMin: version.timeLimitMin,
				attemptsBeforeCooldown: version.attemptsBeforeCooldown,
				cooldownMin: version.cooldownMin,
				revisionId: version.revisionId
			},
			zod4(versionSettingsSchema),
			{ id: 'settings' }
		),
		approveForm: await superValidate(zod4(approveSchema), { id: 'approve' }),
		returnForm: await superValidate(zod4(returnSchema), { id: 'return' })
	};
};

const removeSchema = z.object({ questionId: z.coerce.number().int().positive() });

export const actions: Actions = {
	settings: async (event) => {
		const user = requireRole(event, ...CHECK_AUTHOR_ROLES);
		const { version } = await versionOf(event);
		const form = await superValidatePosted(event.request, zod4(versionSettingsSchema), {
			id: 'settings'
		});
		if (!form.valid) return fail(400, { settingsForm: form });
		try {
			await updateVersionSettings(actorOf(event, user.id), version.id, form.data);
		} catch (err) {
			if (err instanceof Refusal) return message(form, err.message, { status: err.status });
			throw err;
		}
		return message(form, 'Settings saved.');
	},
	remove: async (event) => {
		const user = requireRole(event, ...CHECK_AUTHOR_ROLES);
		const { version } = await versionOf(event);
		const parsed = removeSchema.safeParse(Object.fromEntries(await event.request.formData()));
		if (!parsed.success) return fail(400, { message: 'Choose a question to remove.' });
		try {
			await removeQuestion(actorOf(event, user.id), version.id, parsed.data.questionId);
		} catch (err) {
			if (err instanceof Refusal) return fail(err.status, { message: err.message });
			throw err;
		}
		redirect(303, here(event));
	},
	submit: async (event) => {
		const user = requireRole(event, ...CHECK_AUTHOR_ROLES);
		const { version } = await versionOf(event);
		try {
			await submitVersion(actorOf(event, user.id), version.id);
		} catch (err) {
			if (err instanceof Refusal) return fail(err.status, { message: err.message });
			throw err;
		}
		redirect(303, here(event));
	},
	approve: async (event) => {
		const user = requireRole(event, ...CHECK_APPROVER_ROLES);
		const { version } = await versionOf(event);
		const form = await superValidatePosted(event.request, zod4(approveSchema), { id: 'approve' });
		if (!form.valid) return fail(400, { approveForm: form });
		const { password, comment } = form.data;
		form.data.password = '';
		try {
			await approveVersion(actorOf(event, user.id), version.id, { password, comment });
		} catch (err) {
			if (err instanceof Refusal) {
				if (err.fields?.password)
					return setError(form, 'password', err.fields.password, { status: err.status });
				return message(form, err.message, { status: err.status });
			}
			throw err;
		}
		redirect(303, here(event));
	},
	return: async (event) => {
		const user = requireRole(event, ...CHECK_APPROVER_ROLES);
		const { version } = await versionOf(event);
		const form = await superValidatePosted(event.request, zod4(returnSchema), { id: 'return' });
		if (!form.valid) return fail(400, { returnForm: form });
		try {
			await returnVersion(actorOf(event, user.id), version.id, form.data.comment);
		} catch (err) {
			if (err instanceof Refusal) return message(form, err.message, { status: err.status });
			throw err;
		}
		redirect(303, here(event));
	}
};
