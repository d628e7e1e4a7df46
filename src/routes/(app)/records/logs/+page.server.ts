import { superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { actorFrom, lastChainVerification, verifyAuditChainRecorded } from '$lib/server/audit';
import { requireRole } from '$lib/server/auth/guards';
import { LOGS_ROLES } from '$lib/server/records/access';
import {
	gateLogChoices,
	gateLogFilterFrom,
	listGateLog
} from '$lib/server/records/gate-log-export';
import { gateLogFilterSchema } from '$lib/schemas/gate-log';
import type { Actions, PageServerLoad } from './$types';

const PAGE_SIZE = 50;

export const load: PageServerLoad = async (event) => {
	const user = requireRole(event, ...LOGS_ROLES);
	const form = await superValidate(event.url, zod4(gateLogFilterSchema));
	const { filter, errors } = await gateLogFilterFrom(form.data, user.timeZone);
	for (const [k, v] of Object.entries(errors)) (form.errors as Record<string, string[]>)[k] = [v];
	const applied = form.valid && !Object.keys(errors).length;
	const [log, choices, chain] = await Promise.all([
		applied ? listGateLog(filter, form.data.page, PAGE_SIZE, user.timeZone) : null,
		gateLogChoices(),
		lastChainVerification()
	]);
	return {
		form,
		applied,
		total: log?.total ?? 0,
		rows: log?.rows ?? [],
		page: form.data.page,
		pageSize: PAGE_SIZE,
		...choices,
		chain,
		canExportAudit: user.roles.some((r) => r === 'quality' || r === 'admin')
	};
};

export const actions: Actions = {
	/** Re-computes the whole audit chain (reads every row, so only on request) and records it. */
	verify: async (event) => {
		requireRole(event, ...LOGS_ROLES);
		const v = await verifyAuditChainRecorded(actorFrom(event), 'page');
		return { verified: { ok: v.ok, ms: v.ms } };
	}
};
