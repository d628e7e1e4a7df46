// The XLSX export, written by exceljs's streaming WorkbookWriter straight into the response:
// typed number and date cells, a frozen header row, an autofilter over every row, column widths.
//
// Backpressure: exceljs commits rows synchronously into the sheet's buffer and ignores the
// return value of its writes into the zip writer, so nothing upstream would slow it down. The
// response pulls instead: rows are added only while the compressed output is empty and the zip
// writer is not behind, so at most a few hundred rows sit between the database and the client.
import { once } from 'node:events';
import { PassThrough, type Writable } from 'node:stream';
import ExcelJS from 'exceljs';
import { formulaSafe } from '../../csv';
import { RECORD_COLUMNS, type CellValue, type ColumnKind } from './columns';
import type { RecordSource } from './export';

const NUM_FMT: Partial<Record<ColumnKind, string>> = {
	int: '0',
	decimal: '0.00',
	instant: 'yyyy-mm-dd hh:mm:ss',
	date: 'yyyy-mm-dd'
};

/** Rows added per step before looking at the output again. */
const ROWS_PER_STEP = 200;

/** Column number (1-based) as letters: 1 → A, 28 → AB. */
export function columnLetters(n: number): string {
	let s = '';
	for (let x = n; x > 0; x = Math.floor((x - 1) / 26))
		s = String.fromCharCode(65 + ((x - 1) % 26)) + s;
	return s;
}

/**
 * A cell value for exceljs. Text that could start a formula is neutralised as in the CSV: exceljs
 * writes strings as plain string cells (never as formulas), but a person who edits the cell, or a
 * program that turns the sheet back into CSV, would let Excel read it as one.
 */
export function xlsxCell(kind: ColumnKind, v: CellValue): ExcelJS.CellValue {
	if (v === null || v === '') return null;
	switch (kind) {
		case 'text':
			return formulaSafe(String(v));
		case 'int':
		case 'decimal':
			return Number(v);
		case 'instant':
			// exceljs stores a Date as its UTC wall-clock time: the cell shows the UTC instant.
			return v instanceof Date ? v : new Date(String(v));
		case 'date': {
			const [y, m, d] = String(v).split('-').map(Number);
			return new Date(Date.UTC(y, m - 1, d));
		}
	}
}

export function xlsxStream(
	source: RecordSource,
	rowCount: number,
	timeZone: string,
	now: Date
): ReadableStream<Uint8Array> {
	const out = new PassThrough();
	const workbook = new ExcelJS.stream.xlsx.WorkbookWriter({
		stream: out,
		useStyles: true,
		useSharedStrings: false
	});
	workbook.creator = 'Padbridge';
	workbook.created = now;
	const sheet = workbook.addWorksheet('Training records', {
		views: [{ state: 'frozen', ySplit: 1 }]
	});
	sheet.columns = RECORD_COLUMNS.map((c, i) => ({
		header: c.header,
		key: String(i),
		width: c.width,
		style: NUM_FMT[c.kind] ? { numFmt: NUM_FMT[c.kind] } : {}
	}));
	sheet.getRow(1).font = { bold: true };
	sheet.autoFilter = `A1:${columnLetters(RECORD_COLUMNS.length)}${rowCount + 1}`;

	let failure: unknown = null;
	let committing: Promise<void> | null = null;
	let committed = false;
	out.once('error', (e) => (failure = e));

	/**
	 * Whether the zip writer is behind: the stream the sheet's XML buffer writes into (archiver's
	 * PassThrough from readable-stream, which keeps its state in `_writableState`) is over its high
	 * water mark. exceljs internals, read defensively: without them only the output check remains.
	 */
	const behind = (): Writable | null => {
		const entry = (sheet as unknown as { _stream?: { pipes?: Writable[] } })._stream?.pipes?.[0];
		const state = (entry as unknown as { _writableState?: { needDrain?: boolean } } | undefined)
			?._writableState;
		return entry && (state?.needDrain ?? entry.writableNeedDrain) ? entry : null;
	};

	/** Resolves when `out` has data, or the zip is complete, or writing it failed. */
	const moreOutput = () =>
		new Promise<void>((resolve) => {
			const done = () => {
				out.off('readable', done);
				out.off('finish', done);
				out.off('error', done);
				resolve();
			};
			out.once('readable', done);
			out.once('finish', done);
			out.once('error', done);
			if (committing && !committed) committing.then(done);
		});

	// One style object per column, shared by all its cells: exceljs caches a style's id by the
	// object, so a fresh object per cell (what it makes from the column style) would be resolved
	// again for every cell, which took two thirds of the export's time.
	const cellStyles = RECORD_COLUMNS.map((c) =>
		NUM_FMT[c.kind] ? { numFmt: NUM_FMT[c.kind] } : {}
	) as Partial<ExcelJS.Style>[];

	async function addRows(): Promise<boolean> {
		for (let n = 0; n < ROWS_PER_STEP; n++) {
			const next = await source.next();
			if (next.done) return false;
			const r = next.value;
			// Empty cells are left out (undefined), not written as styled blanks.
			const row = sheet.addRow(
				RECORD_COLUMNS.map((c) => xlsxCell(c.kind, c.value(r, timeZone)) ?? undefined)
			);
			row.eachCell((cell, col) => {
				cell.style = cellStyles[col - 1];
			});
			row.commit();
		}
		return true;
	}

	return new ReadableStream<Uint8Array>({
		async pull(controller) {
			try {
				for (;;) {
					if (failure) throw failure;
					const chunk = out.read() as Buffer | null;
					if (chunk) {
						controller.enqueue(new Uint8Array(chunk.buffer, chunk.byteOffset, chunk.length));
						return;
					}
					if (out.writableFinished && out.readableLength === 0) {
						await source.finish();
						controller.close();
						return;
					}
					if (committing) {
						await moreOutput();
						continue;
					}
					const slow = behind();
					if (slow) {
						await once(slow, 'drain');
						continue;
					}
					if (!(await addRows())) {
						sheet.commit();
						committing = workbook.commit().then(
							() => {
								committed = true;
							},
							(e: unknown) => {
								committed = true;
								failure = e ?? new Error('the XLSX writer failed');
							}
						);
					}
					// Let zlib and the zip writer move what was added into `out` (a macrotask, so
					// their callbacks run before the next look).
					await new Promise((resolve) => setImmediate(resolve));
				}
			} catch (err) {
				source.abort();
				out.destroy();
				throw err;
			}
		},
		cancel() {
			source.abort();
			out.destroy();
		}
	});
}
