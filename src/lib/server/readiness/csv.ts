// The Readiness board as CSV: one row per person, one column per process with the cell's word
// and a second with its expiry date. UTF-8 with BOM, RFC 4180 and formula-safe (src/lib/csv.ts).
import { CSV_BOM, csvRow } from '../../csv';
import { readinessCellText } from '../../readiness';
import { localDate } from '../../time';
import type { ReadinessBoard } from './index';

export function readinessCsv(board: ReadinessBoard): string {
	// Expiry instants repeat across thousands of cells; a formatter per call would dominate.
	const days = new Map<string, string>();
	const day = (iso: string) => {
		let d = days.get(iso);
		if (d === undefined) days.set(iso, (d = localDate(new Date(iso), board.timeZone)));
		return d;
	};
	const header = ['name', 'employee_no', 'shift', 'agency', 'agency_name'];
	for (const p of board.processes) header.push(p.code, `${p.code} expires_on`);
	let out = CSV_BOM + csvRow(header);
	for (const person of board.people) {
		const cells: unknown[] = [
			person.name,
			person.employeeNo,
			person.shift,
			person.agency ? 'yes' : 'no',
			person.agencyName
		];
		for (const c of person.cells)
			cells.push(readinessCellText(c, day), c.expiresAt ? day(c.expiresAt) : null);
		out += csvRow(cells);
	}
	return out;
}
