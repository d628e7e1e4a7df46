// A CSV reader of the tests' own, so export tests do not trust the code they check.

/** RFC 4180 records: quoted fields with doubled quotes; every record ends with CRLF. */
export function parseCsv(text: string): string[][] {
	const rows: string[][] = [];
	let row: string[] = [];
	let cell = '';
	let quoted = false;
	for (let i = 0; i < text.length; i++) {
		const c = text[i];
		if (quoted) {
			if (c === '"' && text[i + 1] === '"') {
				cell += '"';
				i++;
			} else if (c === '"') quoted = false;
			else cell += c;
		} else if (c === '"' && cell === '') quoted = true;
		else if (c === ',') {
			row.push(cell);
			cell = '';
		} else if (c === '\r' && text[i + 1] === '\n') {
			row.push(cell);
			rows.push(row);
			row = [];
			cell = '';
			i++;
		} else cell += c;
	}
	if (cell !== '' || row.length) throw new Error('the CSV does not end with CRLF');
	return rows;
}
