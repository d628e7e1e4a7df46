// The columns of the training-record export, shared by the CSV and the XLSX writer: the header,
// the kind of value (which decides the CSV text and the XLSX cell type) and the XLSX width.
import type { TrainingRecord } from '../../records/training-records';
import { localDate } from '../../time';

/**
 * text: a string (formula-neutralised in both formats); int/decimal: a number; instant: a UTC
 * instant (ISO 8601 in CSV, a date-time cell in XLSX showing UTC); date: a plant date
 * (YYYY-MM-DD in CSV, a date cell in XLSX).
 */
export type ColumnKind = 'text' | 'int' | 'decimal' | 'instant' | 'date';

export type CellValue = string | number | Date | null;

export interface ExportColumn {
	header: string;
	kind: ColumnKind;
	/** XLSX column width in characters. */
	width: number;
	value: (r: TrainingRecord, timeZone: string) => CellValue;
}

const plantDate = (at: Date | null, timeZone: string) => (at ? localDate(at, timeZone) : null);

export const RECORD_COLUMNS: ExportColumn[] = [
	{ header: 'person_id', kind: 'int', width: 10, value: (r) => r.personId },
	{ header: 'person', kind: 'text', width: 28, value: (r) => r.person },
	{ header: 'employee_no', kind: 'text', width: 14, value: (r) => r.employeeNo },
	{ header: 'line', kind: 'text', width: 8, value: (r) => r.line },
	{ header: 'line_name', kind: 'text', width: 22, value: (r) => r.lineName },
	{ header: 'employment_type', kind: 'text', width: 12, value: (r) => r.employmentType },
	{ header: 'agency', kind: 'text', width: 18, value: (r) => r.agency },
	{ header: 'process', kind: 'text', width: 12, value: (r) => r.process },
	{ header: 'process_name', kind: 'text', width: 26, value: (r) => r.processName },
	{ header: 'instruction', kind: 'text', width: 14, value: (r) => r.instruction },
	{ header: 'revision', kind: 'text', width: 8, value: (r) => r.revision },
	{ header: 'acknowledged_at_utc', kind: 'instant', width: 20, value: (r) => r.acknowledgedAt },
	{
		header: 'acknowledged_on',
		kind: 'date',
		width: 12,
		value: (r, tz) => plantDate(r.acknowledgedAt, tz)
	},
	{ header: 'check_score_pct', kind: 'decimal', width: 10, value: (r) => r.checkScorePct },
	{ header: 'check_attempts', kind: 'int', width: 9, value: (r) => r.checkAttempts },
	{ header: 'check_at_utc', kind: 'instant', width: 20, value: (r) => r.checkAt },
	{ header: 'signoff_on', kind: 'date', width: 12, value: (r, tz) => plantDate(r.signoffAt, tz) },
	{ header: 'signoff_at_utc', kind: 'instant', width: 20, value: (r) => r.signoffAt },
	{ header: 'signoff_signer', kind: 'text', width: 24, value: (r) => r.signoffSigner },
	{ header: 'signoff_result', kind: 'text', width: 12, value: (r) => r.signoffResult },
	{ header: 'certificate_no', kind: 'text', width: 26, value: (r) => r.certificateNo },
	{ header: 'issued_at_utc', kind: 'instant', width: 20, value: (r) => r.issuedAt },
	{ header: 'issued_on', kind: 'date', width: 12, value: (r, tz) => plantDate(r.issuedAt, tz) },
	{ header: 'expires_at_utc', kind: 'instant', width: 20, value: (r) => r.expiresAt },
	{ header: 'expires_on', kind: 'date', width: 12, value: (r, tz) => plantDate(r.expiresAt, tz) },
	{ header: 'state', kind: 'text', width: 18, value: (r) => r.state },
	{ header: 'assigned_at_utc', kind: 'instant', width: 20, value: (r) => r.assignedAt },
	{ header: 'time_zone', kind: 'text', width: 18, value: (_r, tz) => tz }
];

export const RECORD_HEADERS = RECORD_COLUMNS.map((c) => c.header);

/** One record as CSV cells: instants as ISO 8601 UTC, plant dates as YYYY-MM-DD. */
export function csvCells(r: TrainingRecord, timeZone: string): CellValue[] {
	return RECORD_COLUMNS.map((c) => {
		const v = c.value(r, timeZone);
		return v instanceof Date ? v.toISOString() : v;
	});
}
