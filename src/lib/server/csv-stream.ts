// A CSV download that streams: the header first, then one batch of rows per pull, then an
// optional last record, so a long export starts at once and never sits in memory.
import { CSV_BOM, csvRow } from '../csv';

export interface CsvStreamParts<T> {
	header: readonly string[];
	/** Batches of rows, read one per pull; `return()` is called when the download is cancelled. */
	batches: AsyncGenerator<T[]>;
	line: (row: T) => string;
	/** The last record, made once every batch has been sent (a statement about the file). */
	trailer?: () => Promise<string> | string;
}

/** UTF-8 with BOM, RFC 4180 rows from `line` (use csvRow), ended by the trailer when given. */
export function csvStream<T>(parts: CsvStreamParts<T>): ReadableStream<Uint8Array> {
	const encoder = new TextEncoder();
	let started = false;
	let finished = false;
	return new ReadableStream<Uint8Array>({
		async pull(controller) {
			if (!started) {
				started = true;
				controller.enqueue(encoder.encode(CSV_BOM + csvRow(parts.header)));
				return;
			}
			if (finished) {
				controller.close();
				return;
			}
			const next = await parts.batches.next();
			if (next.done) {
				finished = true;
				if (parts.trailer) controller.enqueue(encoder.encode(await parts.trailer()));
				else controller.close();
				return;
			}
			controller.enqueue(encoder.encode(next.value.map(parts.line).join('')));
		},
		async cancel() {
			await parts.batches.return(undefined);
		}
	});
}
