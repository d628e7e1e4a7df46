// Training records written straight into the test database, so rule evaluation, issuing and the
// lifecycle can be tested requirement by requirement without walking every screen.
import { randomBytes } from 'node:crypto';
import type { ResultSetHeader } from 'mysql2/promise';
import { appDb, queryRows } from './db';

const tag = () => randomBytes(3).toString('hex').toUpperCase();

async function insert(sql: string, params: unknown[]): Promise<number> {
	const [res] = await appDb().query<ResultSetHeader>(sql, params);
	return res.insertId;
}

export async function makeProcess(): Promise<{ id: number; code: string }> {
	const code = `TP-${tag()}`;
	const id = await insert(
		"INSERT INTO processes (code, name, bond_type, active) VALUES (?, ?, 'COG', 1)",
		[code, `Test process ${code}`]
	);
	return { id, code };
}

export interface FixtureRev {
	letter: string;
	effectiveFrom: Date;
	classification?: 'editorial' | 'acknowledge' | 'retraining';
}

/** An instruction with approved revisions effective at the given instants. */
export async function makeInstructionRows(
	ownerId: number,
	processId: number | null,
	revs: FixtureRev[]
): Promise<{ id: number; docNumber: string; revisionIds: number[] }> {
	const docNumber = `WI-TF${tag()}-001`;
	const now = new Date();
	const id = await insert(
		'INSERT INTO instructions (doc_number, title, process_id, owner_id, created_at) VALUES (?, ?, ?, ?, ?)',
		[docNumber, `Fixture ${docNumber}`, processId, ownerId, now]
	);
	const revisionIds: number[] = [];
	for (const r of revs) {
		revisionIds.push(
			await insert(
				`INSERT INTO revisions (instruction_id, letter, state, source, content_hash, classification,
				   author_id, created_at, updated_at, approved_at, approved_by, effective_from, version)
				 VALUES (?, ?, 'approved', ?, ?, ?, ?, ?, ?, ?, ?, ?, 1)`,
				[
					id,
					r.letter,
					`# ${docNumber} rev ${r.letter}`,
					'0'.repeat(64),
					r.classification ?? 'retraining',
					ownerId,
					now,
					now,
					now,
					ownerId,
					r.effectiveFrom
				]
			)
		);
	}
	return { id, docNumber, revisionIds };
}

export interface FixtureRule {
	processId: number;
	createdBy: number;
	instructionIds: number[];
	checkId?: number | null;
	checklistId?: number | null;
	practicalRequired?: boolean;
	validityMonths?: number;
	graceDays?: number;
	reminderDays?: number[];
	passMarkPct?: number;
	version?: number;
	activeFrom?: Date;
}

export async function makeRule(r: FixtureRule): Promise<number> {
	const id = await insert(
		`INSERT INTO certification_rules (process_id, version, check_id, pass_mark_pct, practical_required,
		   checklist_id, validity_months, grace_days, reminder_days, show_full_name_on_verify, created_by,
		   created_at, active_from)
		 VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, 0, ?, ?, ?)`,
		[
			r.processId,
			r.version ?? 1,
			r.checkId ?? null,
			r.passMarkPct ?? 80,
			r.practicalRequired ?? false,
			r.checklistId ?? null,
			r.validityMonths ?? 12,
			r.graceDays ?? 14,
			JSON.stringify(r.reminderDays ?? [30, 7]),
			r.createdBy,
			new Date(),
			r.activeFrom ?? new Date(Date.now() - 86_400_000)
		]
	);
	for (const ins of r.instructionIds) {
		await insert('INSERT INTO rule_instructions (rule_id, instruction_id) VALUES (?, ?)', [
			id,
			ins
		]);
	}
	return id;
}

export async function acknowledge(personId: number, revisionId: number, at = new Date()) {
	return insert(
		`INSERT INTO acknowledgements (person_id, revision_id, method, content_hash, acknowledged_at)
		 VALUES (?, ?, 'pin', ?, ?)`,
		[personId, revisionId, '0'.repeat(64), at]
	);
}

/** A knowledge check with one approved version and one question, for attempts to point at. */
export async function makeCheck(processId: number, ownerId: number) {
	const code = `KC-T${tag()}`;
	const checkId = await insert(
		'INSERT INTO knowledge_checks (code, title, process_id, owner_id, created_at) VALUES (?, ?, ?, ?, ?)',
		[code, `Fixture check ${code}`, processId, ownerId, new Date()]
	);
	const versionId = await insert(
		`INSERT INTO check_versions (check_id, version, state, questions_per_attempt, attempts_before_cooldown,
		   cooldown_min, author_id, created_at, updated_at, approved_at)
		 VALUES (?, 1, 'approved', 1, 1, 60, ?, ?, ?, ?)`,
		[checkId, ownerId, new Date(), new Date(), new Date()]
	);
	return { checkId, versionId, code };
}

/** A submitted attempt, passed or not, at `at`. */
export async function submittedAttempt(
	personId: number,
	check: { versionId: number },
	processId: number,
	passed: boolean,
	at = new Date()
) {
	return insert(
		`INSERT INTO check_attempts (person_id, check_version_id, process_id, pass_mark_pct, state,
		   started_at, submitted_at, score_pct, passed)
		 VALUES (?, ?, ?, 80, 'submitted', ?, ?, ?, ?)`,
		[
			personId,
			check.versionId,
			processId,
			new Date(at.getTime() - 600_000),
			at,
			passed ? 100 : 40,
			passed
		]
	);
}

export async function makeChecklist(processId: number, revisionId: number, createdBy: number) {
	const id = await insert(
		'INSERT INTO checklists (process_id, revision_id, title, created_by, created_at) VALUES (?, ?, ?, ?, ?)',
		[processId, revisionId, `Fixture checklist ${tag()}`, createdBy, new Date()]
	);
	await insert('INSERT INTO checklist_items (checklist_id, position, text) VALUES (?, 1, ?)', [
		id,
		'Buffer sheet replaced'
	]);
	return id;
}

/** A practical sign-off in its final state: countersigned (passed or failed items) at `at`. */
export async function completedSignoff(
	personId: number,
	trainerId: number,
	checklistId: number,
	processId: number,
	revisionId: number,
	passed: boolean,
	at = new Date()
) {
	return insert(
		`INSERT INTO signoffs (person_id, checklist_id, process_id, revision_id, trainer_id, state, passed,
		   content_hash, created_at, trainer_signed_at, operator_signed_at)
		 VALUES (?, ?, ?, ?, ?, 'countersigned', ?, ?, ?, ?, ?)`,
		[personId, checklistId, processId, revisionId, trainerId, passed, '0'.repeat(64), at, at, at]
	);
}

export async function certificateRows(personId: number, processId: number) {
	return queryRows<{
		id: number;
		number: string;
		state: string;
		issued_at: Date;
		expires_at: Date;
		grace_until: Date | null;
		previous_id: number | null;
		pdf_key: string | null;
	}>(appDb(), 'SELECT * FROM certificates WHERE person_id = ? AND process_id = ? ORDER BY id', [
		personId,
		processId
	]);
}
