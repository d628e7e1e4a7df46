// Downloads of a training history, as PDF (people read it) or JSON (machines read it: GDPR access
// and portability). Both are made from trainingHistory(), audited as 'records.history_exported'
// with the person and the format, and sent as attachments.
import { error, type RequestEvent } from '@sveltejs/kit';
import { actorFrom, recordAuditNow } from '../audit';
import { localDate } from '../../time';
import { trainingHistory, type TrainingHistory } from './history';
import { renderHistoryPdf } from './history-pdf';

export type HistoryFormat = 'pdf' | 'json';

/** The `format` field of the JSON; bumped when a field changes meaning or goes away. */
export const HISTORY_JSON_FORMAT = 'padbridge.training-history';
export const HISTORY_JSON_VERSION = 1;

/**
 * The history as the JSON download carries it (field names documented in the help page
 * content/help/history-and-logs.md): instants as ISO 8601 UTC strings, plant dates as YYYY-MM-DD.
 */
export function historyJson(h: TrainingHistory, generatedBy: string) {
	return {
		format: HISTORY_JSON_FORMAT,
		formatVersion: HISTORY_JSON_VERSION,
		generatedAt: h.generatedAt.toISOString(),
		generatedBy,
		timeZone: h.timeZone,
		plant: h.plant,
		person: h.person,
		assignments: h.assignments,
		acknowledgements: h.acknowledgements,
		knowledgeCheckAttempts: h.attempts,
		practicalSignoffs: h.signoffs,
		certificates: h.certificates
	};
}

/** Safe in a Content-Disposition file name (employee numbers are free text). */
const fileSafe = (s: string) => s.replace(/[^A-Za-z0-9._-]+/g, '_').slice(0, 60) || 'person';

/**
 * The history of `personId` as a download, after the caller has authorised the request. `self`
 * marks the person's own "my records" download in the audit event.
 */
export async function historyDownload(
	event: RequestEvent,
	personId: number,
	format: HistoryFormat,
	self: boolean
): Promise<Response> {
	const h = await trainingHistory(personId);
	if (!h) error(404, { message: 'No such person.' });
	const actor = actorFrom(event);
	const body =
		format === 'pdf'
			? await renderHistoryPdf(h, { generatedBy: actor.label })
			: JSON.stringify(historyJson(h, actor.label), null, 2);
	await recordAuditNow(actor, {
		action: 'records.history_exported',
		entityType: 'person',
		entityId: personId,
		newValues: {
			format,
			self,
			employeeNo: h.person.employeeNo,
			rows: {
				assignments: h.assignments.length,
				acknowledgements: h.acknowledgements.length,
				attempts: h.attempts.length,
				signoffs: h.signoffs.length,
				certificates: h.certificates.length
			}
		}
	});
	const name = `training-history-${fileSafe(h.person.employeeNo)}-${localDate(h.generatedAt, h.timeZone)}.${format}`;
	return new Response(body as BodyInit, {
		headers: {
			'Content-Type': format === 'pdf' ? 'application/pdf' : 'application/json; charset=utf-8',
			'Content-Disposition': `attachment; filename="${name}"`
		}
	});
}
