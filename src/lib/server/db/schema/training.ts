import { relations } from 'drizzle-orm';
import {
	bigint,
	boolean,
	char,
	date,
	datetime,
	decimal,
	index,
	int,
	json,
	mysqlEnum,
	mysqlTable,
	primaryKey,
	text,
	uniqueIndex,
	varchar
} from 'drizzle-orm/mysql-core';
import { lines, people } from './people';
import { processes, stations } from './stations';
import { instructions, revisions } from './instructions';
import {
	ASSIGNMENT_SCOPES,
	ATTEMPT_STATES,
	CHECK_STATES,
	QUESTION_KINDS,
	SIGNOFF_STATES
} from '../../../training/vocabulary';

const id = (name: string) => bigint(name, { mode: 'number', unsigned: true });
const pk = () => bigint({ mode: 'number', unsigned: true }).autoincrement().primaryKey();
const instant = () => datetime({ mode: 'date', fsp: 3 });
const now = () =>
	instant()
		.notNull()
		.$defaultFn(() => new Date());

/**
 * Knowledge checks: the register (one row per check, e.g. KC-COG-MB) and its versions. A version
 * is authored by a trainer and approved by quality; attempts always use an approved version.
 */
export const knowledgeChecks = mysqlTable('knowledge_checks', {
	id: pk(),
	code: varchar({ length: 32 }).notNull().unique(),
	title: varchar({ length: 300 }).notNull(),
	processId: id('process_id')
		.notNull()
		.references(() => processes.id),
	ownerId: id('owner_id')
		.notNull()
		.references(() => people.id),
	createdAt: now()
});

export const checkVersions = mysqlTable(
	'check_versions',
	{
		id: pk(),
		checkId: id('check_id')
			.notNull()
			.references(() => knowledgeChecks.id),
		version: int().notNull(),
		state: mysqlEnum(CHECK_STATES).notNull().default('draft'),
		/** Instruction revision the questions were written against (optional). */
		revisionId: id('revision_id').references(() => revisions.id),
		/** How many questions each attempt draws from the pool. */
		questionsPerAttempt: int().notNull(),
		timeLimitMin: int(),
		/** Attempts allowed before the cool-down starts again. */
		attemptsBeforeCooldown: int().notNull().default(1),
		cooldownMin: int().notNull().default(60),
		authorId: id('author_id')
			.notNull()
			.references(() => people.id),
		submittedAt: instant(),
		approvedAt: instant(),
		approvedBy: id('approved_by').references(() => people.id),
		/** sha256 over settings and questions, bound by the approval signature. */
		contentHash: char({ length: 64 }),
		createdAt: now(),
		updatedAt: now()
	},
	(t) => [uniqueIndex('check_versions_check_version').on(t.checkId, t.version)]
);

/**
 * A question of the pool. `choices` are [{ id, text }]. `answerKey` never leaves the server:
 * single/true_false { correct: id }, multiple { correct: id[] }, numeric { value, tolerance,
 * toleranceKind: 'abs' | 'pct', unit }. A calculated question has `calc`: { calculatorId, output,
 * unit, tolerancePct, params: { name: { min, max, step } | { value } } } and its key is computed
 * per attempt from the drawn parameters by the calculator code.
 */
export const checkQuestions = mysqlTable(
	'check_questions',
	{
		id: pk(),
		checkVersionId: id('check_version_id')
			.notNull()
			.references(() => checkVersions.id),
		position: int().notNull(),
		kind: mysqlEnum(QUESTION_KINDS).notNull(),
		prompt: text().notNull(),
		choices: json().$type<{ id: string; text: string }[]>(),
		answerKey: json().$type<Record<string, unknown>>(),
		calc: json().$type<Record<string, unknown>>(),
		/** Shown in the review after submission, only for questions the person got wrong. */
		explanation: text(),
		points: int().notNull().default(1)
	},
	(t) => [index('check_questions_version').on(t.checkVersionId, t.position)]
);

/**
 * One attempt at a check version. Graded on the server once: the submit is a conditional UPDATE
 * on state = 'open', and a trigger refuses any change after submission (see the migration).
 */
export const checkAttempts = mysqlTable(
	'check_attempts',
	{
		id: pk(),
		personId: id('person_id')
			.notNull()
			.references(() => people.id),
		checkVersionId: id('check_version_id')
			.notNull()
			.references(() => checkVersions.id),
		processId: id('process_id')
			.notNull()
			.references(() => processes.id),
		/** Pass mark in force when the attempt started (from the certification rule). */
		passMarkPct: int().notNull(),
		state: mysqlEnum(ATTEMPT_STATES).notNull().default('open'),
		startedAt: now(),
		deadlineAt: instant(),
		submittedAt: instant(),
		scorePct: decimal({ precision: 5, scale: 2, mode: 'number' }),
		passed: boolean()
	},
	(t) => [
		index('check_attempts_person').on(t.personId, t.checkVersionId, t.startedAt),
		// The records export counts and picks attempts per person and process.
		index('check_attempts_person_process').on(t.personId, t.processId, t.submittedAt)
	]
);

/** The questions drawn for one attempt, their drawn parameters, key, response and grade. */
export const attemptItems = mysqlTable(
	'attempt_items',
	{
		id: pk(),
		attemptId: id('attempt_id')
			.notNull()
			.references(() => checkAttempts.id),
		questionId: id('question_id')
			.notNull()
			.references(() => checkQuestions.id),
		position: int().notNull(),
		/** Drawn parameters of a calculated question, and the prompt rendered with them. */
		params: json().$type<Record<string, number>>(),
		prompt: text().notNull(),
		/** Choice order shown to this attempt. */
		choiceOrder: json().$type<string[]>(),
		/** Server-only key for this item (the calculator's result for calculated questions). */
		answerKey: json().$type<Record<string, unknown>>().notNull(),
		response: json().$type<unknown>(),
		correct: boolean(),
		pointsAwarded: int()
	},
	(t) => [uniqueIndex('attempt_items_attempt_position').on(t.attemptId, t.position)]
);

/**
 * Certification rules, versioned: each row is one version for a process; the version in force is
 * the newest with activeFrom ≤ now. Certificates record the version they were issued under.
 */
export const certificationRules = mysqlTable(
	'certification_rules',
	{
		id: pk(),
		processId: id('process_id')
			.notNull()
			.references(() => processes.id),
		version: int().notNull(),
		/** Knowledge check to pass (its approved version at attempt time); null = none needed. */
		checkId: id('check_id').references(() => knowledgeChecks.id),
		passMarkPct: int().notNull().default(80),
		practicalRequired: boolean().notNull().default(true),
		checklistId: id('checklist_id').references(() => checklists.id),
		validityMonths: int().notNull().default(12),
		graceDays: int().notNull().default(14),
		/** Days before expiry at which reminders go out, e.g. [30, 7]; the first opens "expiring". */
		reminderDays: json().$type<number[]>().notNull(),
		/** Whether the verification page may show the holder's full name (else initials). */
		showFullNameOnVerify: boolean().notNull().default(false),
		note: text(),
		createdBy: id('created_by')
			.notNull()
			.references(() => people.id),
		createdAt: now(),
		activeFrom: instant().notNull()
	},
	(t) => [uniqueIndex('certification_rules_process_version').on(t.processId, t.version)]
);

/** Instructions whose effective revision must be acknowledged under a rule version. */
export const ruleInstructions = mysqlTable(
	'rule_instructions',
	{
		ruleId: id('rule_id')
			.notNull()
			.references(() => certificationRules.id),
		instructionId: id('instruction_id')
			.notNull()
			.references(() => instructions.id)
	},
	(t) => [primaryKey({ columns: [t.ruleId, t.instructionId] })]
);

/** A process a person has to qualify on, with a due date. Assigning by line or station expands to people. */
export const assignments = mysqlTable(
	'assignments',
	{
		id: pk(),
		personId: id('person_id')
			.notNull()
			.references(() => people.id),
		processId: id('process_id')
			.notNull()
			.references(() => processes.id),
		scope: mysqlEnum(ASSIGNMENT_SCOPES).notNull().default('person'),
		lineId: id('line_id').references(() => lines.id),
		stationId: id('station_id').references(() => stations.id),
		dueOn: date({ mode: 'string' }),
		assignedBy: id('assigned_by')
			.notNull()
			.references(() => people.id),
		assignedAt: now(),
		closedAt: instant(),
		closedReason: varchar({ length: 200 })
	},
	(t) => [index('assignments_person').on(t.personId, t.processId)]
);

/**
 * "I have read and understood revision C", re-authenticated with the person's own PIN or
 * password, bound to the revision's content hash. Append-only.
 */
export const acknowledgements = mysqlTable(
	'acknowledgements',
	{
		id: pk(),
		personId: id('person_id')
			.notNull()
			.references(() => people.id),
		revisionId: id('revision_id')
			.notNull()
			.references(() => revisions.id),
		method: mysqlEnum(['pin', 'password']).notNull(),
		contentHash: char({ length: 64 }).notNull(),
		acknowledgedAt: now()
	},
	(t) => [uniqueIndex('acknowledgements_person_revision').on(t.personId, t.revisionId)]
);

/** Practical sign-off checklists, tied to an instruction revision. */
export const checklists = mysqlTable('checklists', {
	id: pk(),
	processId: id('process_id')
		.notNull()
		.references(() => processes.id),
	revisionId: id('revision_id')
		.notNull()
		.references(() => revisions.id),
	title: varchar({ length: 300 }).notNull(),
	createdBy: id('created_by')
		.notNull()
		.references(() => people.id),
	createdAt: now(),
	retiredAt: instant()
});

export const checklistItems = mysqlTable(
	'checklist_items',
	{
		id: pk(),
		checklistId: id('checklist_id')
			.notNull()
			.references(() => checklists.id),
		position: int().notNull(),
		/** An observable step, e.g. "Force entered matches the bump area". */
		text: varchar({ length: 500 }).notNull()
	},
	(t) => [uniqueIndex('checklist_items_position').on(t.checklistId, t.position)]
);

/** One observed demonstration at the machine, signed by a trainer and countersigned by the operator. */
export const signoffs = mysqlTable(
	'signoffs',
	{
		id: pk(),
		personId: id('person_id')
			.notNull()
			.references(() => people.id),
		checklistId: id('checklist_id')
			.notNull()
			.references(() => checklists.id),
		processId: id('process_id')
			.notNull()
			.references(() => processes.id),
		revisionId: id('revision_id')
			.notNull()
			.references(() => revisions.id),
		stationId: id('station_id').references(() => stations.id),
		trainerId: id('trainer_id')
			.notNull()
			.references(() => people.id),
		state: mysqlEnum(SIGNOFF_STATES).notNull().default('draft'),
		passed: boolean(),
		/** sha256 over the items' results, comments and photos, bound by both signatures. */
		contentHash: char({ length: 64 }),
		createdAt: now(),
		trainerSignedAt: instant(),
		operatorSignedAt: instant()
	},
	(t) => [index('signoffs_person').on(t.personId, t.processId)]
);

export const signoffItems = mysqlTable(
	'signoff_items',
	{
		signoffId: id('signoff_id')
			.notNull()
			.references(() => signoffs.id),
		itemId: id('item_id')
			.notNull()
			.references(() => checklistItems.id),
		result: mysqlEnum(['pass', 'fail']),
		comment: varchar({ length: 1000 }),
		photoKey: varchar({ length: 200 }),
		photoType: varchar({ length: 100 })
	},
	(t) => [primaryKey({ columns: [t.signoffId, t.itemId] })]
);

export const knowledgeChecksRelations = relations(knowledgeChecks, ({ many, one }) => ({
	versions: many(checkVersions),
	process: one(processes, { fields: [knowledgeChecks.processId], references: [processes.id] })
}));

export const checkVersionsRelations = relations(checkVersions, ({ one, many }) => ({
	check: one(knowledgeChecks, {
		fields: [checkVersions.checkId],
		references: [knowledgeChecks.id]
	}),
	questions: many(checkQuestions)
}));

export const checkQuestionsRelations = relations(checkQuestions, ({ one }) => ({
	version: one(checkVersions, {
		fields: [checkQuestions.checkVersionId],
		references: [checkVersions.id]
	})
}));

export const checklistsRelations = relations(checklists, ({ many }) => ({
	items: many(checklistItems)
}));

export const checklistItemsRelations = relations(checklistItems, ({ one }) => ({
	checklist: one(checklists, {
		fields: [checklistItems.checklistId],
		references: [checklists.id]
	})
}));
