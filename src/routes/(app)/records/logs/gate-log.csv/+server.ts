import { json } from '@sveltejs/kit';
import { superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { actorFrom } from '$lib/server/audit';
import { describeFilter } from '$lib/server/audit/filter';
import { requireRole } from '$lib/server/auth/guards';
import { LOGS_ROLES } from '$lib/server/records/access';
import { exportGateLogCsv, gateLogFilterFrom } from '$lib/server/records/gate-log-export';
import { gateLogFilterSchema } from '$lib/schemas/gate-log';
import { localDate } from '$lib/time';
import type { RequestHandler } from './$types';

export const GET: RequestHandler = async (event) => {
	const user = requireRole(event, ...LOGS_ROLES);
	const form = await superValidate(event.url, zod4(gateLogFilterSchema));
	const { filter, errors } = await gateLogFilterFrom(form.data, user.timeZone);
	if (!form.valid || Object.keys(errors).length) {
		const fields = { ...form.errors, ...errors };
		return json({ error: 'Check the filter.', fields }, { status: 400 });
	}
	const { stream } = await exportGateLogCsv(
		actorFrom(event),
		filter,
		describeFilter(form.data, user.timeZone),
		user.timeZone
	);
	return new Response(stream, {
		headers: {
			'Content-Type': 'text/csv; charset=utf-8',
			'Content-Disposition': `attachment; filename="gate-log-${localDate(new Date(), user.timeZone)}.csv"`
		}
	});
};
