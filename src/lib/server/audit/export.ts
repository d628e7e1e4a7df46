import { csvRow } from '../../csv';
import { csvStream } from '../csv-stream';
import { formatInstant } from '../../audit-view';
import {
	auditEventBatches,
	countAuditEvents,
	describeChainVerification,
	recordAuditNow,
	verifyAuditChainRecorded,
	type Actor,
	type AuditFilter,
	type ChainVerification
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

/** The `action` of the export's last record, which states the chain verification. */
export const CHAIN_TRAILER_ACTION = 'audit.chain_verification';

/**
 * The last record of every audit export: the same columns as an event, with an empty seq, the
 * verification's time, `action` audit.chain_verification, the result in words in `reason`, the
 * figures as JSON in `new_values` and the verified chain head's hash in `hash`. A file without it
 * was cut short.
 */
function chainTrailer(
	v: ChainVerification,
	file: { rows: number; upToSeq: number; auditSeq: number },
	at: Date,
	timeZone: string
) {
	const sorted = [...v.problems].sort((a, b) => a.seq - b.seq);
	return csvRow([
		null,
		at.toISOString(),
		formatInstant(at, timeZone),
		timeZone,
		null,
		'Padbridge',
		CHAIN_TRAILER_ACTION,
		'audit_trail',
		null,
		`${describeChainVerification(v)} This file holds ${file.rows} event row${file.rows === 1 ? '' : 's'} above this line (up to seq ${file.upToSeq}); the export itself is seq ${file.auditSeq}.`,
		null,
		null,
		{
			result: v.ok ? 'verified' : 'broken',
			checkedRows: v.checked,
			headSeq: v.headSeq,
			verifiedUpToSeq: v.verifiedUpToSeq,
			brokenAtSeq: v.brokenAtSeq,
			problems: sorted.slice(0, 20),
			problemCount: v.problems.length,
			exportedRows: file.rows,
			exportedUpToSeq: file.upToSeq,
			exportSeq: file.auditSeq
		},
		v.ok ? v.headHash : null
	]);
}

/**
 * The audit events a filter matches as CSV (UTF-8 with BOM, RFC 4180, formula-safe), newest
 * first. The export itself is written to the trail first ('audit.export', with the filter and
 * the row count); the rows are bounded by the newest seq at that moment, so the count is exact.
 * The whole chain is verified while the rows stream (recorded as 'audit.verify'), and the last
 * record states the result (see chainTrailer).
 */
export async function exportAuditCsv(
	actor: Actor,
	filter: AuditFilter,
	described: Record<string, unknown>,
	timeZone: string
) {
	const { rows, maxSeq } = await countAuditEvents(filter);
	const auditSeq = await recordAuditNow(actor, {
		action: 'audit.export',
		entityType: 'audit_trail',
		newValues: { format: 'csv', filter: described, rows, upToSeq: maxSeq }
	});
	const batches = auditEventBatches({ ...filter, upToSeq: maxSeq });
	// Verified beside the streaming, after the export's own event, so the check covers every row sent.
	const verification = verifyAuditChainRecorded(actor, 'export');
	verification.catch(() => {
		// Reported through the stream below; this only keeps the rejection from going unhandled.
	});
	const stream = csvStream({
		header: HEADER,
		batches,
		line: (r) =>
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
			]),
		trailer: async () =>
			chainTrailer(await verification, { rows, upToSeq: maxSeq, auditSeq }, new Date(), timeZone)
	});
	return { rows, stream, verification, auditSeq };
}
