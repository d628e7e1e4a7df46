// Training records for HR and auditors: the filter, the row-count preview and the rows. The
// exports (CSV, XLSX) stream the same SELECT; see export.ts.
import { and, asc, eq, or } from 'drizzle-orm';
import type { RowDataPacket } from 'mysql2';
import { db, pool } from '../db';
import { lines, people, processes } from '../db/schema';
import { resolveSiteId } from '../plant/common';
import { deriveCertificateStatus } from '../../training/status';
import type { CertificateState } from '../../training/vocabulary';
import type { TrainingRecord } from '../../records/training-records';
import type { RecordsFilterInput } from '../../schemas/records';
import { zonedToUtc } from '../../time';
import {
	recordsCountQuery,
	recordsFirstPeopleQuery,
	recordsQuery,
	type RecordRow,
	type RecordsFilter
} from './query';

export type { RecordsFilter } from './query';

function nextDay(date: string): string {
	const d = new Date(`${date}T00:00:00Z`);
	d.setUTCDate(d.getUTCDate() + 1);
	return d.toISOString().slice(0, 10);
}

export type ResolvedFilter =
	| { ok: true; filter: RecordsFilter; described: Record<string, string> }
	| { ok: false; fields: Record<string, string> };

/**
 * The database filter for the form's values. Dates are whole plant days in `timeZone`: the period
 * runs from 00:00 on "from" up to 00:00 on the day after "to". A line code is looked up in the
 * user's site; a person is an employee number, or failing that a person id. Unknown values come
 * back as field errors.
 */
export async function resolveRecordsFilter(
	input: RecordsFilterInput,
	siteId: number | null,
	timeZone: string
): Promise<ResolvedFilter> {
	const fields: Record<string, string> = {};
	const filter: RecordsFilter = {};
	if (input.from) filter.from = zonedToUtc(input.from, '00:00', timeZone);
	if (input.to) filter.before = zonedToUtc(nextDay(input.to), '00:00', timeZone);
	if (input.state) filter.state = input.state;
	const [line, process, person] = await Promise.all([
		input.line
			? resolveSiteId(siteId).then((site) =>
					db
						.select({ id: lines.id })
						.from(lines)
						.where(and(eq(lines.siteId, site), eq(lines.code, input.line)))
				)
			: null,
		input.process
			? db.select({ id: processes.id }).from(processes).where(eq(processes.code, input.process))
			: null,
		input.person
			? db
					.select({ id: people.id, employeeNo: people.employeeNo })
					.from(people)
					.where(
						/^\d{1,15}$/.test(input.person)
							? or(eq(people.employeeNo, input.person), eq(people.id, Number(input.person)))
							: eq(people.employeeNo, input.person)
					)
			: null
	]);
	if (line) {
		if (line[0]) filter.lineId = line[0].id;
		else fields.line = `No line ${input.line} at this plant`;
	}
	if (process) {
		if (process[0]) filter.processId = process[0].id;
		else fields.process = `No process ${input.process}`;
	}
	if (person) {
		// An employee number wins over an id that happens to look the same.
		const match =
			person.find((p) => p.employeeNo.toLowerCase() === input.person.toLowerCase()) ?? person[0];
		if (match) filter.personId = match.id;
		else fields.person = `No person with employee number or id ${input.person}`;
	}
	if (Object.keys(fields).length) return { ok: false, fields };
	const described = Object.fromEntries(
		Object.entries(input).filter(([, v]) => v !== '') as [string, string][]
	);
	if (described.from || described.to) described.timeZone = timeZone;
	return { ok: true, filter, described };
}

/** The choices of the filter form: the site's lines and every process. */
export async function recordsChoices(siteId: number | null) {
	const site = await resolveSiteId(siteId);
	const [lineRows, processRows] = await Promise.all([
		db
			.select({ code: lines.code, name: lines.name })
			.from(lines)
			.where(eq(lines.siteId, site))
			.orderBy(asc(lines.code)),
		db
			.select({ code: processes.code, name: processes.name })
			.from(processes)
			.orderBy(asc(processes.code))
	]);
	return { lines: lineRows, processes: processRows };
}

const num = (v: string | number | null) => (v == null ? null : Number(v));

/**
 * A database row as a record. The state of a certificate row is derived here by the same function
 * the gate and the board use; the SQL copy of it only selected the row.
 */
export function toTrainingRecord(r: RecordRow, now: Date): TrainingRecord {
	const state =
		r.certificate_id != null
			? deriveCertificateStatus(
					{
						state: r.certificate_state as CertificateState,
						expiresAt: r.expires_at!,
						graceUntil: r.grace_until
					},
					now,
					Number(r.expiring_days)
				)
			: r.record_state;
	return {
		personId: r.person_id,
		person: r.person_name,
		employeeNo: r.employee_no,
		line: r.line_code,
		lineName: r.line_name,
		employmentType: r.employment_type,
		agency: r.agency_name,
		process: r.process_code,
		processName: r.process_name,
		instruction: r.doc_number,
		revision: r.revision_letter,
		acknowledgedAt: r.acknowledged_at,
		checkScorePct: num(r.check_score_pct),
		checkAttempts: Number(r.check_attempts),
		checkAt: r.check_at,
		signoffAt: r.signoff_at,
		signoffSigner: r.signoff_signer,
		signoffResult: r.signoff_result,
		certificateNo: r.certificate_number,
		issuedAt: r.issued_at,
		expiresAt: r.expires_at,
		state,
		assignedAt: r.assigned_at
	};
}

/** How many rows the filter matches at `now`. */
export async function countTrainingRecords(f: RecordsFilter, now: Date): Promise<number> {
	const q = recordsCountQuery(f, now);
	const [rows] = await pool.query<RowDataPacket[]>(q.sql, q.params);
	return Number(rows[0].n);
}

/**
 * The count and the first `limit` rows, for the Records page. The rows are looked for among the
 * first `limit` people only (see recordsFirstPeopleQuery, which counts in the same pass), so a
 * filter of 100,000 rows does not sort them all for a page of 50.
 */
export async function previewTrainingRecords(f: RecordsFilter, limit: number, now = new Date()) {
	const first = recordsFirstPeopleQuery(f, now, limit);
	const [people] = await pool.query<RowDataPacket[]>(first.sql, first.params);
	if (!people.length) return { total: 0, rows: [] };
	const total = Number(people[0].total);
	const personIds = people.map((p) => Number(p.person_id));
	const q = recordsQuery({ ...f, personIds }, now, limit);
	const [rows] = await pool.query<RowDataPacket[]>(q.sql, q.params);
	return { total, rows: (rows as RecordRow[]).map((r) => toTrainingRecord(r, now)) };
}

/** Every row of the filter at `now`, in export order; for tests and small reads only. */
export async function listTrainingRecords(f: RecordsFilter, now: Date) {
	const q = recordsQuery(f, now);
	const [rows] = await pool.query<RowDataPacket[]>(q.sql, q.params);
	return rows as RecordRow[];
}
