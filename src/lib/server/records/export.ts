// The training-record exports, CSV and XLSX, streamed. One connection holds a consistent snapshot
// (a read-only InnoDB transaction) for the count and the rows, so the row count written to the
// audit trail is exactly what the file holds, whatever is written meanwhile. The rows come from a
// mysql2 query stream and are pulled by the response: when the client reads slowly, the socket to
// MariaDB is paused, so memory stays flat whatever the size of the export.
import type { Connection as CoreConnection } from 'mysql2';
import type { PoolConnection, RowDataPacket } from 'mysql2/promise';
import { pool } from '../db';
import { recordAuditNow, type Actor } from '../audit';
import { CSV_BOM, csvRow } from '../../csv';
import { localDate } from '../../time';
import type { TrainingRecord } from '../../records/training-records';
import { recordsCountQuery, recordsQuery, type RecordRow, type RecordsFilter } from './query';
import { toTrainingRecord } from './index';
import { csvCells, RECORD_HEADERS } from './columns';
import { xlsxStream } from './xlsx';

export type ExportFormat = 'csv' | 'xlsx';

/** Rows handed from the database to a writer, one at a time, and the snapshot behind them. */
export interface RecordSource {
	next(): Promise<IteratorResult<TrainingRecord, undefined>>;
	/** Ends the snapshot and gives the connection back (after the last row). */
	finish(): Promise<void>;
	/** Drops the connection (client went away, or a writer failed). Safe to call twice. */
	abort(): void;
}

/**
 * Opens the snapshot, counts the rows, lets `beforeRows` run with the count (the audit event),
 * then starts the stream. The connection is closed on any failure before the stream starts.
 */
export async function openRecordSource(
	f: RecordsFilter,
	now: Date,
	beforeRows: (rows: number) => Promise<void>
): Promise<{ rows: number; source: RecordSource }> {
	const conn: PoolConnection = await pool.getConnection();
	let open = true;
	const abort = () => {
		if (!open) return;
		open = false;
		// Mid-result the connection cannot go back to the pool; closing it ends the transaction.
		conn.destroy();
	};
	try {
		await conn.query('START TRANSACTION WITH CONSISTENT SNAPSHOT, READ ONLY');
		const c = recordsCountQuery(f, now);
		const [countRows] = await conn.query<RowDataPacket[]>(c.sql, c.params);
		const rows = Number(countRows[0].n);
		await beforeRows(rows);
		const q = recordsQuery(f, now);
		const core = conn.connection as unknown as CoreConnection;
		const stream = core.query(q.sql, q.params).stream({ highWaterMark: 512 });
		const it = stream[Symbol.asyncIterator]() as AsyncIterator<RecordRow>;
		const source: RecordSource = {
			async next() {
				const r = await it.next();
				return r.done
					? { done: true, value: undefined }
					: { done: false, value: toTrainingRecord(r.value, now) };
			},
			async finish() {
				if (!open) return;
				await conn.query('COMMIT');
				open = false;
				conn.release();
			},
			abort
		};
		return { rows, source };
	} catch (err) {
		abort();
		throw err;
	}
}

/** CSV: UTF-8 with BOM, RFC 4180, formula-safe cells (csv.ts); about 64 KB per chunk. */
export function csvStream(source: RecordSource, timeZone: string): ReadableStream<Uint8Array> {
	const encoder = new TextEncoder();
	let started = false;
	return new ReadableStream<Uint8Array>({
		async pull(controller) {
			if (!started) {
				started = true;
				controller.enqueue(encoder.encode(CSV_BOM + csvRow(RECORD_HEADERS)));
				return;
			}
			try {
				let text = '';
				while (text.length < 65_536) {
					const next = await source.next();
					if (next.done) {
						if (text) controller.enqueue(encoder.encode(text));
						await source.finish();
						controller.close();
						return;
					}
					text += csvRow(csvCells(next.value, timeZone));
				}
				controller.enqueue(encoder.encode(text));
			} catch (err) {
				source.abort();
				throw err;
			}
		},
		cancel() {
			source.abort();
		}
	});
}

export const EXPORT_TYPES: Record<ExportFormat, string> = {
	csv: 'text/csv; charset=utf-8',
	xlsx: 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet'
};

/**
 * An export of the filter's rows: the count is taken in the snapshot, the export is written to the
 * audit trail ('records.export' with the filter, the format and the row count), then the rows
 * stream. Nothing is sent when the audit event cannot be written.
 */
export async function exportTrainingRecords(
	actor: Actor,
	f: RecordsFilter,
	described: Record<string, string>,
	timeZone: string,
	format: ExportFormat,
	now: Date = new Date()
) {
	const { rows, source } = await openRecordSource(f, now, async (rows) => {
		await recordAuditNow(actor, {
			action: 'records.export',
			entityType: 'training_records',
			newValues: { format, filter: described, rows, asOf: now.toISOString() }
		});
	});
	const stream =
		format === 'csv' ? csvStream(source, timeZone) : xlsxStream(source, rows, timeZone, now);
	const filename = `training-records-${localDate(now, timeZone)}.${format}`;
	return { rows, stream, filename, contentType: EXPORT_TYPES[format] };
}
