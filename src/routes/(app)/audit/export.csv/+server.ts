import { json } from '@sveltejs/kit';
import { superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { actorFrom } from '$lib/server/audit';
import { exportAuditCsv } from '$lib/server/audit/export';
import { auditFilterFrom, describeFilter } from '$lib/server/audit/filter';
import { requireRole } from '$lib/server/auth/guards';
import { auditFilterSchema } from '$lib/schemas/audit';
import { localDate } from '$lib/time';
import type { RequestHandler } from './$types';

export const GET: RequestHandler = async (event) => {
	const user = requireRole(event, 'quality', 'admin');
	const form = await superValidate(event.url, zod4(auditFilterSchema));
	if (!form.valid)
		return json({ error: 'Check the filter.', fields: form.errors }, { status: 400 });
	const { page: _page, ...all } = auditFilterFrom(form.data, user.timeZone);
	const { stream } = await exportAuditCsv(
		actorFrom(event),
		all,
		describeFilter(form.data, user.timeZone),
		user.timeZone
	);
	const day = localDate(new Date(), user.timeZone);
	return new Response(stream, {
		headers: {
			'Content-Type': 'text/csv; charset=utf-8',
			'Content-Disposition': `attachment; filename="audit-trail-${day}.csv"`
		}
	});
};
