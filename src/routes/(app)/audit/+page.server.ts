import { superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import {
	actorFrom,
	listAuditEvents,
	listAuditFacets,
	verifyAuditChainRecorded
} from '$lib/server/audit';
import { auditFilterFrom } from '$lib/server/audit/filter';
import { requireRole } from '$lib/server/auth/guards';
import { auditFilterSchema } from '$lib/schemas/audit';
import type { Actions, PageServerLoad } from './$types';

const PAGE_SIZE = 50;

export const load: PageServerLoad = async (event) => {
	const user = requireRole(event, 'quality', 'admin');
	const form = await superValidate(event.url, zod4(auditFilterSchema));
	const [list, facets] = await Promise.all([
		form.valid
			? listAuditEvents({ ...auditFilterFrom(form.data, user.timeZone), pageSize: PAGE_SIZE })
			: null,
		listAuditFacets()
	]);
	return {
		form,
		facets,
		total: list?.total ?? 0,
		page: list?.page ?? 1,
		pageSize: PAGE_SIZE,
		events: (list?.rows ?? []).map((r) => ({
			seq: r.seq,
			at: r.at,
			actorId: r.actorId,
			actorLabel: r.actorLabel,
			action: r.action,
			entityType: r.entityType,
			entityId: r.entityId,
			reason: r.reason,
			address: r.address,
			oldValues: r.oldValues,
			newValues: r.newValues
		}))
	};
};

export const actions: Actions = {
	/** Re-computes the whole hash chain: on request only, since it reads every row. */
	verify: async (event) => {
		requireRole(event, 'quality', 'admin');
		const result = await verifyAuditChainRecorded(actorFrom(event), 'page');
		const ms = result.ms;
		return {
			verify: {
				ok: result.ok,
				checked: result.checked,
				ms,
				problemCount: result.problems.length,
				problems: result.problems.slice(0, 100)
			}
		};
	}
};
