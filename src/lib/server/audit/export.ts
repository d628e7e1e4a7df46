import { CSV_BOM, csvRow } from '../../csv';
import { formatInstant } from '../../audit-view';
import {
	auditEventBatches,
	countAuditEvents,
	recordAuditNow,
	type Actor,
	type AuditFilter
} from './index';

const HEADER = [
	'seq',
	'at_utc',
	'at_local',
	'time_zone',
	'actor_id',
	'actor',
	'action',
	'entity_type',
	'entity_id',
	'reason',
	'address',
	'old_values',
	'new_values',
	'hash'
];

/**
 * The audit events a filter matches as CSV (UTF-8 with BOM, RFC 4180, formula-safe), newest
 * first. The export itself is written to the trail first ('audit.export', with the filter and
 * the row count); the rows are bounded by the newest seq at that moment, so the count is exact.
 */
export async function exportAuditCsv(
	actor: Actor,
	filter: AuditFilter,
	described: Record<string, unknown>,
	timeZone: string
) {
	const { rows, maxSeq } = await countAuditEvents(filter);
	await recordAuditNow(actor, {
		action: 'audit.export',
		entityType: 'audit_trail',
		newValues: { format: 'csv', filter: described, rows, upToSeq: maxSeq }
	});
	const batches = auditEventBatches({ ...filter, upToSeq: maxSeq });
	const encoder = new TextEncoder();
	let started = false;
	const stream = new ReadableStream<Uint8Array>({
		async pull(controller) {
			if (!started) {
				started = true;
				controller.enqueue(encoder.encode(CSV_BOM + csvRow(HEADER)));
				return;
			}
			const next = await batches.next();
			if (next.done) {
				controller.close();
				return;
			}
			const text = next.value
				.map((r) =>
					csvRow([
						r.seq,
						r.at.toISOString(),
						formatInstant(r.at, timeZone),
						timeZone,
						r.actorId,
						r.actorLabel,
						r.action,
						r.entityType,
						r.entityId,
						r.reason,
						r.address,
						r.oldValues,
						r.newValues,
						r.hash
					])
				)
				.join('');
			controller.enqueue(encoder.encode(text));
		},
		async cancel() {
			await batches.return(undefined);
		}
	});
	return { rows, stream };
}
