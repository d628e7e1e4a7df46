// The station gate log (gate_checks) for quality and HR: a filtered page on screen and a streamed
// CSV export (UTF-8 with BOM, RFC 4180, formula-safe), audited with its filter and exact row count
// like the audit trail export. The gate log is append-only but not hash-chained; the export's last
// record says so, in the place where the audit export states its chain verification.
import { and, asc, desc, eq, gte, like, lt, lte, or, sql, type SQL } from 'drizzle-orm';
import { db } from '../db';
import { apiKeys, gateChecks, lines, people, stations } from '../db/schema';
import { recordAuditNow, type Actor } from '../audit';
import { plantPeriod } from '../audit/filter';
import { csvRow } from '../../csv';
import { csvStream } from '../csv-stream';
import { formatInstant } from '../../audit-view';
import { describeGateReason, describeGateWarning } from '../../gate/describe';
import type { GateReason, GateWarning } from '../../gate/decide';
import type { GateLogFilterInput } from '../../schemas/gate-log';

export interface GateLogFilter {
	from?: Date;
	/** Exclusive upper bound. */
	before?: Date;
	stationCode?: string;
	lineId?: number;
	/** Badge as scanned or employee number (exact), or part of the person's name. */
	person?: string;
	decision?: 'allow' | 'deny';
	/** Only rows up to this id (a stable end for exports). */
	upToId?: number;
}

/** Stations and lines for the filter form. */
export async function gateLogChoices() {
	const [stationRows, lineRows] = await Promise.all([
		db.select({ code: stations.code }).from(stations).orderBy(asc(stations.code)),
		db.select({ code: lines.code, name: lines.name }).from(lines).orderBy(asc(lines.code))
	]);
	return { stations: stationRows.map((s) => s.code), lines: lineRows };
}

/** The database filter for the form's values; an unknown line is a field error. */
export async function gateLogFilterFrom(
	input: GateLogFilterInput,
	timeZone: string
): Promise<{ filter: GateLogFilter; errors: Record<string, string> }> {
	const errors: Record<string, string> = {};
	let lineId: number | undefined;
	if (input.line) {
		const [l] = await db.select({ id: lines.id }).from(lines).where(eq(lines.code, input.line));
		if (l) lineId = l.id;
		else errors.line = `No line ${input.line}.`;
	}
	return {
		filter: {
			...plantPeriod(input.from, input.to, timeZone),
			stationCode: input.station || undefined,
			lineId,
			person: input.person || undefined,
			decision: input.decision || undefined
		},
		errors
	};
}

function gateLogWhere(f: GateLogFilter): SQL | undefined {
	const where: (SQL | undefined)[] = [];
	if (f.from) where.push(gte(gateChecks.at, f.from));
	if (f.before) where.push(lt(gateChecks.at, f.before));
	if (f.stationCode) where.push(eq(gateChecks.stationCode, f.stationCode));
	if (f.lineId) where.push(eq(stations.lineId, f.lineId));
	if (f.decision) where.push(eq(gateChecks.decision, f.decision));
	if (f.upToId !== undefined) where.push(lte(gateChecks.id, f.upToId));
	if (f.person) {
		const term = `%${f.person.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
		where.push(
			or(
				eq(gateChecks.badge, f.person),
				eq(people.employeeNo, f.person),
				like(people.displayName, term)
			)
		);
	}
	return and(...where);
}

const columns = {
	id: gateChecks.id,
	at: gateChecks.at,
	stationCode: gateChecks.stationCode,
	lineCode: lines.code,
	badge: gateChecks.badge,
	personId: gateChecks.personId,
	employeeNo: people.employeeNo,
	personName: people.displayName,
	decision: gateChecks.decision,
	reasons: gateChecks.reasons,
	warnings: gateChecks.warnings,
	source: gateChecks.source,
	apiKeyId: gateChecks.apiKeyId,
	apiKeyName: apiKeys.name,
	latencyMs: gateChecks.latencyMs
};

function selectRows(cond: SQL | undefined) {
	return db
		.select(columns)
		.from(gateChecks)
		.leftJoin(stations, eq(stations.id, gateChecks.stationId))
		.leftJoin(lines, eq(lines.id, stations.lineId))
		.leftJoin(people, eq(people.id, gateChecks.personId))
		.leftJoin(apiKeys, eq(apiKeys.id, gateChecks.apiKeyId))
		.where(cond);
}

export type GateLogRow = Awaited<ReturnType<typeof selectRows>>[number];

/** How many rows a filter matches and the newest id among them. */
export async function countGateLog(f: GateLogFilter) {
	const [r] = await db
		.select({ n: sql<number>`count(*)`, maxId: sql<number | null>`max(${gateChecks.id})` })
		.from(gateChecks)
		.leftJoin(stations, eq(stations.id, gateChecks.stationId))
		.leftJoin(people, eq(people.id, gateChecks.personId))
		.where(gateLogWhere(f));
	return { rows: Number(r.n), maxId: r.maxId == null ? 0 : Number(r.maxId) };
}

/** A page of the log, newest first, with the reasons and warnings in words. */
export async function listGateLog(f: GateLogFilter, page: number, pageSize = 50, timeZone: string) {
	const [rows, count] = await Promise.all([
		selectRows(gateLogWhere(f))
			.orderBy(desc(gateChecks.id))
			.limit(pageSize)
			.offset((Math.max(1, page) - 1) * pageSize),
		countGateLog(f)
	]);
	return {
		total: count.rows,
		rows: rows.map((r) => ({
			id: r.id,
			at: r.at,
			stationCode: r.stationCode,
			lineCode: r.lineCode,
			badge: r.badge,
			employeeNo: r.employeeNo,
			personName: r.personName,
			decision: r.decision,
			reasons: r.reasons.map((x) => describeGateReason(x as GateReason, timeZone, r.at)),
			warnings: r.warnings.map((x) => describeGateWarning(x as GateWarning, timeZone, r.at)),
			source: r.source,
			apiKeyName: r.apiKeyName
		}))
	};
}

/** The filter's rows, newest first, in batches (keyset paging on id). */
async function* gateLogBatches(f: GateLogFilter, batchSize = 1000) {
	let below: number | undefined;
	for (;;) {
		const cond = gateLogWhere(f);
		const rows = await selectRows(below === undefined ? cond : and(cond, lt(gateChecks.id, below)))
			.orderBy(desc(gateChecks.id))
			.limit(batchSize);
		if (rows.length) yield rows;
		if (rows.length < batchSize) return;
		below = rows[rows.length - 1].id;
	}
}

export const GATE_LOG_HEADER = [
	'id',
	'at_utc',
	'at_local',
	'time_zone',
	'station',
	'line',
	'badge',
	'person_id',
	'employee_no',
	'person',
	'decision',
	'reason_codes',
	'reasons',
	'warning_codes',
	'warnings',
	'source',
	'api_key',
	'latency_ms'
];

/** The `decision` column of the export's last record, which states what the file is. */
export const GATE_LOG_TRAILER = 'export_statement';

const codes = (list: { code: string; process?: string }[]) =>
	list.map((x) => (x.process ? `${x.process}:${x.code}` : x.code)).join('; ');

function csvLine(r: GateLogRow, timeZone: string): string {
	return csvRow([
		r.id,
		r.at.toISOString(),
		formatInstant(r.at, timeZone),
		timeZone,
		r.stationCode,
		r.lineCode,
		r.badge,
		r.personId,
		r.employeeNo,
		r.personName,
		r.decision,
		codes(r.reasons),
		r.reasons.map((x) => describeGateReason(x as GateReason, timeZone, r.at)).join('; '),
		codes(r.warnings),
		r.warnings.map((x) => describeGateWarning(x as GateWarning, timeZone, r.at)).join('; '),
		r.source,
		r.apiKeyName ?? (r.apiKeyId == null ? null : `key ${r.apiKeyId}`),
		r.latencyMs
	]);
}

/** The statement in the last record of a gate log export. */
export function gateLogStatement(rows: number, upToId: number, auditSeq: number): string {
	return (
		`Gate log export: ${rows} decision row${rows === 1 ? '' : 's'} above this line (ids up to ${upToId}), ` +
		`recorded in the audit trail as seq ${auditSeq}. The gate log is not hash-chained: the database lets ` +
		'the application only add and read its rows (retention alone removes decisions past their period ' +
		"or blanks an anonymised person's badge, through two fixed database procedures), but no hash " +
		'links one row to the next, so unlike the audit trail export this file carries no chain verification.'
	);
}

/**
 * The gate decisions a filter matches as CSV, newest first. The export is audited first
 * ('gate_log.export' with the filter and the row count); the rows are bounded by the newest id
 * at that moment, so the count is exact. The last record states what the file is (see
 * gateLogStatement): empty id, `decision` export_statement, the words in `reasons`.
 */
export async function exportGateLogCsv(
	actor: Actor,
	filter: GateLogFilter,
	described: Record<string, unknown>,
	timeZone: string
) {
	const { rows, maxId } = await countGateLog(filter);
	const auditSeq = await recordAuditNow(actor, {
		action: 'gate_log.export',
		entityType: 'gate_log',
		newValues: { format: 'csv', filter: described, rows, upToId: maxId }
	});
	const stream = csvStream({
		header: GATE_LOG_HEADER,
		batches: gateLogBatches({ ...filter, upToId: maxId }),
		line: (r) => csvLine(r, timeZone),
		trailer: () => {
			const at = new Date();
			const cells: unknown[] = GATE_LOG_HEADER.map(() => null);
			cells[1] = at.toISOString();
			cells[2] = formatInstant(at, timeZone);
			cells[3] = timeZone;
			cells[10] = GATE_LOG_TRAILER;
			cells[12] = gateLogStatement(rows, maxId, auditSeq);
			return csvRow(cells);
		}
	});
	return { rows, stream, auditSeq };
}
