// The training-record query: one SELECT (two parts, UNION ALL) whose rows are the records HR and
// auditors export. It is built once per filter and run three ways: counted, previewed (LIMIT) and
// streamed (mysql2 query stream, see export.ts), so the count, the preview and the file agree.
//
// Grain: one row per person × process × instruction revision.
// - Certificates (every state, superseded and withdrawn included): one row per instruction
//   revision of the certificate's basis (the acknowledged revisions, and the revision of the
//   practical sign-off when it is not one of them); a certificate whose basis names no revision
//   gets one row without an instruction. The check and the sign-off are the basis records.
// - People assigned to (an open assignment) or training on (a check attempt or a sign-off for) a
//   process they hold no certificate for at all: one row per instruction the rule in force lists,
//   at its effective revision now, with what they have done so far (the acknowledgement of that
//   revision, the latest submitted attempt, the latest signed sign-off).
import { sql, type SQL } from 'drizzle-orm';
import { MySqlDialect } from 'drizzle-orm/mysql-core';
import type { RecordState } from '../../records/training-records';

export interface RecordsFilter {
	/** Start of the period (inclusive): 00:00 plant time on the "from" date. */
	from?: Date;
	/** End of the period (exclusive): 00:00 plant time on the day after the "to" date. */
	before?: Date;
	lineId?: number;
	processId?: number;
	personId?: number;
	/** Only these people (the preview's first page of people; see recordsFirstPeopleQuery). */
	personIds?: number[];
	state?: RecordState;
}

/** A row as the database returns it (mysql2: DATETIME as Date, DECIMAL as string). */
export interface RecordRow {
	person_id: number;
	person_name: string;
	employee_no: string;
	line_code: string | null;
	line_name: string | null;
	employment_type: string;
	agency_name: string | null;
	process_code: string;
	process_name: string;
	doc_number: string | null;
	revision_letter: string | null;
	acknowledged_at: Date | null;
	check_score_pct: string | number | null;
	check_attempts: number | string;
	check_at: Date | null;
	signoff_at: Date | null;
	signoff_signer: string | null;
	signoff_result: string | null;
	certificate_id: number | null;
	certificate_number: string | null;
	issued_at: Date | null;
	expires_at: Date | null;
	certificate_state: string | null;
	grace_until: Date | null;
	expiring_days: number | string | null;
	record_state: RecordState;
	assigned_at: Date | null;
}

const CERTIFICATE_STATES = new Set([
	'valid',
	'expiring',
	'retraining_due',
	'retraining_overdue',
	'expired',
	'suspended',
	'withdrawn',
	'superseded'
]);

/**
 * The derived status of certificate `c` at `now`, in SQL. It mirrors deriveCertificateStatus
 * (training/status.ts), which is what the exported column shows; the SQL copy exists so the state
 * filter and the count run in the database. tests/integration/records.test.ts checks that both
 * agree on every row, at the boundaries of expiry, grace and the expiring window.
 */
function certificateStatus(now: Date): SQL {
	return sql`CASE
		WHEN c.state IN ('withdrawn', 'suspended', 'superseded') THEN c.state
		WHEN c.state = 'expired' OR c.expires_at <= ${now} THEN 'expired'
		WHEN c.state = 'retraining_due' THEN
			IF(c.grace_until IS NOT NULL AND c.grace_until > ${now}, 'retraining_due', 'retraining_overdue')
		WHEN c.expires_at <= DATE_ADD(CAST(${now} AS DATETIME(3)), INTERVAL rd.expiring_days DAY) THEN 'expiring'
		ELSE 'valid' END`;
}

/** The id of the revision of instruction `i` in force at `now` (instructions/effective.ts). */
function effectiveRevisionOf(i: string, now: Date): SQL {
	const alias = sql.raw(i);
	return sql`(SELECT er.id FROM revisions er
		WHERE er.instruction_id = ${alias}.id AND er.state IN ('approved', 'superseded')
		  AND er.effective_from <= ${now}
		  AND (${alias}.withdrawn_at IS NULL OR ${alias}.withdrawn_at > ${now})
		ORDER BY er.effective_from DESC, er.id DESC LIMIT 1)`;
}

const signoffResult = sql`CASE
		WHEN s.id IS NULL THEN NULL
		WHEN s.state = 'countersigned' AND s.passed THEN 'passed'
		WHEN s.state IN ('countersigned', 'failed') THEN 'failed'
		WHEN s.state = 'trainer_signed' THEN 'awaiting countersign'
		ELSE 'draft' END`;

const signoffAt = sql`COALESCE(s.operator_signed_at, s.trainer_signed_at)`;

/** `at` falls in [from, before). */
function within(at: SQL, f: RecordsFilter): SQL {
	const parts = [sql`${at} IS NOT NULL`];
	if (f.from) parts.push(sql`${at} >= ${f.from}`);
	if (f.before) parts.push(sql`${at} < ${f.before}`);
	return sql.join(parts, sql` AND `);
}

const hasPeriod = (f: RecordsFilter) => !!(f.from || f.before);

/** An IN list; an empty one matches nothing (NULL is never equal to an id). */
const inList = (ids: number[]) =>
	ids.length
		? sql.join(
				ids.map((id) => sql`${id}`),
				sql`, `
			)
		: sql`NULL`;

/** What the count and the first-people query need of a row: who it belongs to, in sort order. */
const keyColumns = sql`p.id AS person_id, p.display_name AS person_name`;

/** The expiring window of each rule: its widest reminder offset, 30 days without any. */
const ruleWindows = sql`(SELECT cr.id, COALESCE(MAX(j.d), 30) AS expiring_days
	FROM certification_rules cr
	LEFT JOIN JSON_TABLE(cr.reminder_days, '$[*]' COLUMNS (d INT PATH '$')) AS j ON TRUE
	GROUP BY cr.id)`;

function certificatePart(f: RecordsFilter, now: Date, countOnly: boolean): SQL {
	const status = certificateStatus(now);
	const where: SQL[] = [];
	if (f.lineId) where.push(sql`p.line_id = ${f.lineId}`);
	if (f.processId) where.push(sql`c.process_id = ${f.processId}`);
	if (f.personId) where.push(sql`c.person_id = ${f.personId}`);
	if (f.personIds) where.push(sql`c.person_id IN (${inList(f.personIds)})`);
	if (f.state) where.push(sql`(${status}) = ${f.state}`);
	if (hasPeriod(f)) {
		const overlap = [sql`TRUE`];
		if (f.before) overlap.push(sql`c.issued_at < ${f.before}`);
		if (f.from) overlap.push(sql`c.expires_at > ${f.from}`);
		where.push(sql`((${sql.join(overlap, sql` AND `)})
			OR (${within(sql`a.acknowledged_at`, f)})
			OR (${within(sql`ca.submitted_at`, f)})
			OR (${within(signoffAt, f)}))`);
	}
	const columns = sql`p.id AS person_id, p.display_name AS person_name, p.employee_no,
		l.code AS line_code, l.name AS line_name, p.employment_type, p.agency_name,
		pr.code AS process_code, pr.name AS process_name,
		i.doc_number, r.letter AS revision_letter, a.acknowledged_at,
		ca.score_pct AS check_score_pct,
		(SELECT COUNT(*) FROM check_attempts x
			WHERE x.person_id = c.person_id AND x.process_id = c.process_id
			  AND x.submitted_at IS NOT NULL AND x.submitted_at <= c.issued_at
			  AND (pc.issued_at IS NULL OR x.submitted_at > pc.issued_at)) AS check_attempts,
		ca.submitted_at AS check_at,
		${signoffAt} AS signoff_at, st.display_name AS signoff_signer, ${signoffResult} AS signoff_result,
		c.id AS certificate_id, c.number AS certificate_number, c.issued_at, c.expires_at,
		c.state AS certificate_state, c.grace_until, rd.expiring_days,
		${status} AS record_state, CAST(NULL AS DATETIME(3)) AS assigned_at`;
	return sql`SELECT ${countOnly ? keyColumns : columns}
	FROM certificates c
	JOIN people p ON p.id = c.person_id
	LEFT JOIN \`lines\` l ON l.id = p.line_id
	JOIN processes pr ON pr.id = c.process_id
	JOIN ${ruleWindows} rd ON rd.id = c.rule_id
	LEFT JOIN certificates pc ON pc.id = c.previous_id
	LEFT JOIN certificate_basis b ON b.certificate_id = c.id AND b.revision_id IS NOT NULL
		AND (b.kind = 'acknowledgement' OR (b.kind = 'signoff' AND NOT EXISTS (
			SELECT 1 FROM certificate_basis b2 WHERE b2.certificate_id = c.id
			  AND b2.kind = 'acknowledgement' AND b2.revision_id = b.revision_id)))
	LEFT JOIN revisions r ON r.id = b.revision_id
	LEFT JOIN instructions i ON i.id = r.instruction_id
	LEFT JOIN acknowledgements a ON a.person_id = c.person_id AND a.revision_id = b.revision_id
	LEFT JOIN certificate_basis ba ON ba.certificate_id = c.id AND ba.kind = 'attempt'
	LEFT JOIN check_attempts ca ON ca.id = ba.ref_id
	LEFT JOIN certificate_basis bs ON bs.certificate_id = c.id AND bs.kind = 'signoff'
	LEFT JOIN signoffs s ON s.id = bs.ref_id
	LEFT JOIN people st ON st.id = s.trainer_id
	${where.length ? sql`WHERE ${sql.join(where, sql` AND `)}` : sql``}`;
}

function trainingPart(f: RecordsFilter, now: Date, countOnly: boolean): SQL {
	const pairWhere: SQL[] = [];
	if (f.processId) pairWhere.push(sql`process_id = ${f.processId}`);
	if (f.personId) pairWhere.push(sql`person_id = ${f.personId}`);
	if (f.personIds) pairWhere.push(sql`person_id IN (${inList(f.personIds)})`);
	const pw = (extra?: SQL) => {
		const all = extra ? [extra, ...pairWhere] : pairWhere;
		return all.length ? sql`WHERE ${sql.join(all, sql` AND `)}` : sql``;
	};
	// Started: any attempt or sign-off for the process, or an acknowledgement of a listed
	// instruction's revision in force; otherwise the person is only assigned.
	const state = sql`CASE WHEN EXISTS (SELECT 1 FROM check_attempts x2
			WHERE x2.person_id = tp.person_id AND x2.process_id = tp.process_id)
		OR EXISTS (SELECT 1 FROM signoffs y2 WHERE y2.person_id = tp.person_id AND y2.process_id = tp.process_id)
		OR EXISTS (SELECT 1 FROM rule_instructions ri2 JOIN instructions i2 ON i2.id = ri2.instruction_id
			JOIN acknowledgements a2 ON a2.person_id = tp.person_id AND a2.revision_id = ${effectiveRevisionOf('i2', now)}
			WHERE ri2.rule_id = cr.id)
		THEN 'in_training' ELSE 'not_started' END`;
	const assignedAt = sql`(SELECT MAX(asg.assigned_at) FROM assignments asg
		WHERE asg.person_id = tp.person_id AND asg.process_id = tp.process_id AND asg.closed_at IS NULL)`;
	const where: SQL[] = [
		sql`NOT EXISTS (SELECT 1 FROM certificates c0 WHERE c0.person_id = tp.person_id AND c0.process_id = tp.process_id)`
	];
	if (f.lineId) where.push(sql`p.line_id = ${f.lineId}`);
	if (f.state) where.push(sql`(${state}) = ${f.state}`);
	if (hasPeriod(f)) {
		where.push(sql`((${within(sql`a.acknowledged_at`, f)})
			OR (${within(sql`ca.submitted_at`, f)})
			OR (${within(signoffAt, f)})
			OR (${within(assignedAt, f)}))`);
	}
	const columns = sql`p.id AS person_id, p.display_name AS person_name, p.employee_no,
		l.code AS line_code, l.name AS line_name, p.employment_type, p.agency_name,
		pr.code AS process_code, pr.name AS process_name,
		i.doc_number, r.letter AS revision_letter, a.acknowledged_at,
		ca.score_pct AS check_score_pct,
		(SELECT COUNT(*) FROM check_attempts x
			WHERE x.person_id = tp.person_id AND x.process_id = tp.process_id
			  AND x.submitted_at IS NOT NULL) AS check_attempts,
		ca.submitted_at AS check_at,
		${signoffAt} AS signoff_at, st.display_name AS signoff_signer, ${signoffResult} AS signoff_result,
		NULL AS certificate_id, NULL AS certificate_number, NULL AS issued_at, NULL AS expires_at,
		NULL AS certificate_state, NULL AS grace_until, NULL AS expiring_days,
		${state} AS record_state, ${assignedAt} AS assigned_at`;
	return sql`SELECT ${countOnly ? keyColumns : columns}
	FROM (
		SELECT person_id, process_id FROM assignments ${pw(sql`closed_at IS NULL`)}
		UNION SELECT person_id, process_id FROM check_attempts ${pw()}
		UNION SELECT person_id, process_id FROM signoffs ${pw()}
	) tp
	JOIN people p ON p.id = tp.person_id
	LEFT JOIN \`lines\` l ON l.id = p.line_id
	JOIN processes pr ON pr.id = tp.process_id
	LEFT JOIN certification_rules cr ON cr.process_id = tp.process_id AND cr.active_from <= ${now}
		AND NOT EXISTS (SELECT 1 FROM certification_rules cr2 WHERE cr2.process_id = cr.process_id
			AND cr2.active_from <= ${now} AND cr2.version > cr.version)
	LEFT JOIN rule_instructions ri ON ri.rule_id = cr.id
	LEFT JOIN instructions i ON i.id = ri.instruction_id
	LEFT JOIN revisions r ON r.id = ${effectiveRevisionOf('i', now)}
	LEFT JOIN acknowledgements a ON a.person_id = tp.person_id AND a.revision_id = r.id
	LEFT JOIN check_attempts ca ON ca.id = (SELECT x3.id FROM check_attempts x3
		WHERE x3.person_id = tp.person_id AND x3.process_id = tp.process_id AND x3.submitted_at IS NOT NULL
		ORDER BY x3.submitted_at DESC, x3.id DESC LIMIT 1)
	LEFT JOIN signoffs s ON s.id = (SELECT y3.id FROM signoffs y3
		WHERE y3.person_id = tp.person_id AND y3.process_id = tp.process_id AND y3.trainer_signed_at IS NOT NULL
		ORDER BY COALESCE(y3.operator_signed_at, y3.trainer_signed_at) DESC, y3.id DESC LIMIT 1)
	LEFT JOIN people st ON st.id = s.trainer_id
	WHERE ${sql.join(where, sql` AND `)}`;
}

/** The rows of a filter at instant `now` (both parts, or the one a state filter leaves). */
function recordsUnion(f: RecordsFilter, now: Date, countOnly = false): SQL {
	const parts: SQL[] = [];
	const certificateState = f.state ? CERTIFICATE_STATES.has(f.state) : null;
	if (certificateState !== false) parts.push(certificatePart(f, now, countOnly));
	if (certificateState !== true) parts.push(trainingPart(f, now, countOnly));
	return sql.join(
		parts.map((p) => sql`(${p})`),
		sql` UNION ALL `
	);
}

/** The export order: people by name, then process, then issue (rows in training first). */
const ORDER = sql`ORDER BY person_name, person_id, process_code, issued_at, certificate_id, doc_number, revision_letter`;

const dialect = new MySqlDialect();

export interface BuiltQuery {
	sql: string;
	params: unknown[];
}

/** The SELECT of a filter as text and parameters for mysql2 (or mysql2's `format` for a CLI). */
export function recordsQuery(f: RecordsFilter, now: Date, limit?: number): BuiltQuery {
	const q = sql`${recordsUnion(f, now)} ${ORDER}`;
	return dialect.sqlToQuery(limit ? sql`${q} LIMIT ${limit}` : q);
}

/**
 * How many rows the same SELECT returns: the same FROM and WHERE of each part (so the same rows),
 * without the columns that cost a lookup per row.
 */
export function recordsCountQuery(f: RecordsFilter, now: Date): BuiltQuery {
	return dialect.sqlToQuery(sql`SELECT COUNT(*) AS n FROM (${recordsUnion(f, now, true)}) t`);
}

/**
 * The first `limit` people, in export order, who have a row under the filter, each with the
 * filter's row count (`total`, the same on every row; no rows when nothing matches). The export
 * order starts with the person, so the first `limit` rows all belong to these people: the preview
 * asks for its rows among them (personIds) instead of sorting every row of the filter, and gets
 * its count from the same pass.
 */
export function recordsFirstPeopleQuery(f: RecordsFilter, now: Date, limit: number): BuiltQuery {
	return dialect.sqlToQuery(sql`SELECT person_id, SUM(COUNT(*)) OVER () AS total
		FROM (${recordsUnion(f, now, true)}) t
		GROUP BY person_id, person_name ORDER BY person_name, person_id LIMIT ${limit}`);
}
