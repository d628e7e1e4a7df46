import { fail, redirect } from '@sveltejs/kit';
import { message, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { actorFrom } from '$lib/server/audit';
import { requireRole } from '$lib/server/auth/guards';
import { Refusal } from '$lib/server/errors';
import { refuseForm, superValidatePosted } from '$lib/server/forms';
import { getRetentionRules, setRetentionRules } from '$lib/server/records/retention-rules';
import {
	listLegalHolds,
	placeLegalHold,
	releaseLegalHold
} from '$lib/server/records/retention-holds';
import {
	listRetentionRuns,
	runRetention,
	runRetentionConfirmed
} from '$lib/server/records/retention';
import {
	placeHoldSchema,
	releaseHoldSchema,
	retentionRulesSchema,
	retentionRunSchema
} from '$lib/schemas/records';
import type { Actions, PageServerLoad } from './$types';

const RETENTION_ROLES = ['hr', 'admin'] as const;

export const load: PageServerLoad = async (event) => {
	const user = requireRole(event, ...RETENTION_ROLES);
	const [rules, holds, runs] = await Promise.all([
		getRetentionRules(),
		listLegalHolds(),
		listRetentionRuns(20)
	]);
	return {
		rules,
		holds,
		runs,
		timeZone: user.timeZone,
		canEditRules: user.roles.includes('admin'),
		rulesForm: await superValidate(
			{
				trainingRecordsYears: rules.training_records.years,
				gateLogYears: rules.gate_log.years,
				reason: ''
			},
			zod4(retentionRulesSchema),
			{ id: 'rules', errors: false }
		),
		holdForm: await superValidate(zod4(placeHoldSchema), { id: 'hold' }),
		releaseForm: await superValidate(zod4(releaseHoldSchema), { id: 'release' }),
		runForm: await superValidate(zod4(retentionRunSchema), { id: 'run' })
	};
};

export const actions: Actions = {
	rules: async (event) => {
		const user = requireRole(event, 'admin');
		const form = await superValidatePosted(event.request, zod4(retentionRulesSchema), {
			id: 'rules'
		});
		if (!form.valid) return fail(400, { rulesForm: form });
		const changed = await setRetentionRules({ ...actorFrom(event), id: user.id }, form.data);
		form.data.reason = '';
		return message(form, changed.length ? 'Retention rules saved.' : 'Nothing changed.');
	},
	hold: async (event) => {
		const user = requireRole(event, ...RETENTION_ROLES);
		const form = await superValidatePosted(event.request, zod4(placeHoldSchema), { id: 'hold' });
		if (!form.valid) return fail(400, { holdForm: form });
		try {
			await placeLegalHold({ ...actorFrom(event), id: user.id }, form.data, user.timeZone);
		} catch (err) {
			return refuseForm(form, err);
		}
		return message(form, `Legal hold placed on ${form.data.employeeNo}.`);
	},
	release: async (event) => {
		const user = requireRole(event, ...RETENTION_ROLES);
		const form = await superValidatePosted(event.request, zod4(releaseHoldSchema), {
			id: 'release'
		});
		if (!form.valid) return fail(400, { releaseForm: form });
		// One form per open hold: the answer comes back under `releaseForm` for the row it names.
		try {
			await releaseLegalHold({ ...actorFrom(event), id: user.id }, form.data, user.timeZone);
		} catch (err) {
			if (!(err instanceof Refusal)) throw err;
			form.message = err.message;
			return fail(err.status, { releaseForm: form });
		}
		form.message = `Legal hold #${form.data.holdId} released.`;
		return { releaseForm: form, released: true };
	},
	dryRun: async (event) => {
		const user = requireRole(event, ...RETENTION_ROLES);
		const { runId } = await runRetention({
			dryRun: true,
			actor: { ...actorFrom(event), id: user.id }
		});
		redirect(303, `/records/retention/runs/${runId}`);
	},
	run: async (event) => {
		const user = requireRole(event, ...RETENTION_ROLES);
		const form = await superValidatePosted(event.request, zod4(retentionRunSchema), { id: 'run' });
		if (!form.valid) return fail(400, { runForm: form });
		let runId: number;
		try {
			({ runId } = await runRetentionConfirmed(
				{ ...actorFrom(event), id: user.id },
				form.data.password
			));
		} catch (err) {
			form.data.password = '';
			return refuseForm(form, err);
		}
		redirect(303, `/records/retention/runs/${runId}`);
	}
};
