// CSV as RFC 4180 describes it, made safe to open in a spreadsheet.

/** A UTF-8 byte order mark, so spreadsheet programs read names with diacritics and CJK correctly. */
export const CSV_BOM = '\uFEFF';

// Spreadsheets treat a cell starting with one of these as a formula (OWASP, "CSV Injection").
const FORMULA_START = /^[=+\-@\t\r]/;

/** Text that could start a formula gets a leading apostrophe (CSV cells and XLSX text cells alike). */
export function formulaSafe(text: string): string {
	return FORMULA_START.test(text) ? `'${text}` : text;
}

/** One cell: text that could start a formula gets a leading apostrophe; quoted when needed. */
export function csvCell(value: unknown): string {
	if (value === null || value === undefined) return '';
	if (typeof value === 'number' || typeof value === 'boolean') return String(value);
	let text =
		typeof value === 'string'
			? value
			: value instanceof Date
				? value.toISOString()
				: JSON.stringify(value);
	text = formulaSafe(text);
	return /[",\r\n]/.test(text) ? `"${text.replace(/"/g, '""')}"` : text;
}

/** One record, ended with CRLF as RFC 4180 asks. */
export function csvRow(cells: readonly unknown[]): string {
	return cells.map(csvCell).join(',') + '\r\n';
}
