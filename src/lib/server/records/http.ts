// GET /records/export.csv and /records/export.xlsx: guard, validate the same filter as the page,
// resolve it, and answer a streamed download that starts at once.
import { json, type RequestEvent } from '@sveltejs/kit';
import { superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { requireRole } from '../auth/guards';
import { actorFrom } from '../audit';
import { recordsFilterSchema } from '../../schemas/records';
import { RECORDS_ROLES } from '../../records/training-records';
import { resolveRecordsFilter } from './index';
import { exportTrainingRecords, type ExportFormat } from './export';

/** superforms' errors ({ field: [messages] }) as { field: first message }. */
function firstErrors(errors: Record<string, unknown>): Record<string, string> {
	const out: Record<string, string> = {};
	for (const [k, v] of Object.entries(errors)) {
		if (Array.isArray(v) && typeof v[0] === 'string') out[k] = v[0];
	}
	return out;
}

export async function recordsExportResponse(
	event: RequestEvent,
	format: ExportFormat
): Promise<Response> {
	const user = requireRole(event, ...RECORDS_ROLES);
	const form = await superValidate(event.url, zod4(recordsFilterSchema));
	const fields = form.valid ? {} : firstErrors(form.errors);
	if (!form.valid) {
		return json(
			{ error: Object.values(fields)[0] ?? 'Check the filter.', fields },
			{ status: 400 }
		);
	}
	const resolved = await resolveRecordsFilter(form.data, user.siteId, user.timeZone);
	if (!resolved.ok) {
		return json(
			{ error: Object.values(resolved.fields)[0], fields: resolved.fields },
			{ status: 400 }
		);
	}
	const out = await exportTrainingRecords(
		actorFrom(event),
		resolved.filter,
		resolved.described,
		user.timeZone,
		format
	);
	return new Response(out.stream, {
		headers: {
			'Content-Type': out.contentType,
			'Content-Disposition': `attachment; filename="${out.filename}"`,
			'X-Record-Count': String(out.rows)
		}
	});
}
