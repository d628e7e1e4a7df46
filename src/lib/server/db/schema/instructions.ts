import { relations } from 'drizzle-orm';
import {
	bigint,
	char,
	date,
	datetime,
	index,
	int,
	mediumtext,
	mysqlEnum,
	mysqlTable,
	primaryKey,
	text,
	tinyint,
	uniqueIndex,
	varchar
} from 'drizzle-orm/mysql-core';
import { people } from './people';
import { processes, stations } from './stations';
import {
	CHANGE_CLASSES,
	FILE_KINDS,
	REVISION_STATES,
	STORED_SIGNATURE_MEANINGS
} from '../../../instructions/vocabulary';

const id = (name: string) => bigint(name, { mode: 'number', unsigned: true });
const instant = () => datetime({ mode: 'date', fsp: 3 });
const now = () =>
	instant()
		.notNull()
		.$defaultFn(() => new Date());

/** The register: one row per controlled work instruction (e.g. WI-COG-004). */
export const instructions = mysqlTable('instructions', {
	id: bigint({ mode: 'number', unsigned: true }).autoincrement().primaryKey(),
	docNumber: varchar({ length: 32 }).notNull().unique(),
	title: varchar({ length: 300 }).notNull(),
	processId: id('process_id').references(() => processes.id),
	ownerId: id('owner_id')
		.notNull()
		.references(() => people.id),
	reviewDueOn: date({ mode: 'string' }),
	/** Set when the instruction is withdrawn; from that instant nothing of it is effective. */
	withdrawnAt: instant(),
	withdrawnReason: text(),
	createdAt: now()
});

/** Stations an instruction applies to (besides the stations running its process). */
export const instructionStations = mysqlTable(
	'instruction_stations',
	{
		instructionId: id('instruction_id')
			.notNull()
			.references(() => instructions.id),
		stationId: id('station_id')
			.notNull()
			.references(() => stations.id)
	},
	(t) => [primaryKey({ columns: [t.instructionId, t.stationId] })]
);

/**
 * One revision (A, B, C …) of an instruction. "Effective" and "superseded" are derived at read
 * time from `effectiveFrom` (see instructions/effective.ts); a job may persist 'superseded' later,
 * and reading treats it exactly like 'approved'.
 */
export const revisions = mysqlTable(
	'revisions',
	{
		id: bigint({ mode: 'number', unsigned: true }).autoincrement().primaryKey(),
		instructionId: id('instruction_id')
			.notNull()
			.references(() => instructions.id),
		letter: varchar({ length: 3 }).notNull(),
		state: mysqlEnum(REVISION_STATES).notNull().default('draft'),
		source: mediumtext().notNull(),
		/** sha256 of the canonical content (source and files) when last saved. */
		contentHash: char({ length: 64 }).notNull(),
		changeSummary: text(),
		reason: text(),
		classification: mysqlEnum(CHANGE_CLASSES),
		authorId: id('author_id')
			.notNull()
			.references(() => people.id),
		lastEditedBy: id('last_edited_by').references(() => people.id),
		createdAt: now(),
		updatedAt: now(),
		submittedAt: instant(),
		approvedAt: instant(),
		approvedBy: id('approved_by').references(() => people.id),
		/** UTC instant from which this revision is the one in force. */
		effectiveFrom: instant(),
		/** Optimistic lock: every write bumps it, a save with an older value is a conflict. */
		version: int().notNull().default(1)
	},
	(t) => [
		uniqueIndex('revisions_instruction_letter').on(t.instructionId, t.letter),
		index('revisions_state_effective').on(t.state, t.effectiveFrom)
	]
);

export const reviewComments = mysqlTable(
	'review_comments',
	{
		id: bigint({ mode: 'number', unsigned: true }).autoincrement().primaryKey(),
		revisionId: id('revision_id')
			.notNull()
			.references(() => revisions.id),
		authorId: id('author_id')
			.notNull()
			.references(() => people.id),
		kind: mysqlEnum(['comment', 'rejection']).notNull().default('comment'),
		body: text().notNull(),
		createdAt: now()
	},
	(t) => [index('review_comments_revision').on(t.revisionId)]
);

/**
 * Electronic signatures, append-only (the app user holds SELECT and INSERT only). Each row is bound
 * to the record's content hash at signing and carries a binding hash over its own fields, so an
 * edit of the record or a row copied to another record fails verification.
 */
export const signatures = mysqlTable(
	'signatures',
	{
		id: bigint({ mode: 'number', unsigned: true }).autoincrement().primaryKey(),
		recordType: varchar({ length: 32 }).notNull(),
		recordId: id('record_id').notNull(),
		signerId: id('signer_id')
			.notNull()
			.references(() => people.id),
		printedName: varchar({ length: 200 }).notNull(),
		meaning: mysqlEnum(STORED_SIGNATURE_MEANINGS).notNull(),
		signedAt: instant().notNull(),
		contentHash: char({ length: 64 }).notNull(),
		bindingHash: char({ length: 64 }).notNull()
	},
	(t) => [index('signatures_record').on(t.recordType, t.recordId)]
);

/** Failed signature re-authentications, counted per signer to throttle and alert. */
export const signatureFailures = mysqlTable(
	'signature_failures',
	{
		id: bigint({ mode: 'number', unsigned: true }).autoincrement().primaryKey(),
		personId: id('person_id')
			.notNull()
			.references(() => people.id),
		at: now()
	},
	(t) => [index('signature_failures_person').on(t.personId, t.at)]
);

/** Images and attachments of a revision, stored in S3 under random keys. */
export const revisionFiles = mysqlTable(
	'revision_files',
	{
		id: bigint({ mode: 'number', unsigned: true }).autoincrement().primaryKey(),
		revisionId: id('revision_id')
			.notNull()
			.references(() => revisions.id),
		kind: mysqlEnum(FILE_KINDS).notNull(),
		storageKey: varchar({ length: 200 }).notNull().unique(),
		/** The uploaded name with any path removed; used in `asset:` references. */
		originalName: varchar({ length: 200 }).notNull(),
		contentType: varchar({ length: 100 }).notNull(),
		sizeBytes: int().notNull(),
		sha256: char({ length: 64 }).notNull(),
		widthPx: int(),
		heightPx: int(),
		uploadedBy: id('uploaded_by')
			.notNull()
			.references(() => people.id),
		createdAt: now()
	},
	(t) => [uniqueIndex('revision_files_name').on(t.revisionId, t.originalName)]
);

/** Bumped in the same transaction as every publication, so each app instance knows to re-index. */
export const searchEpoch = mysqlTable('search_epoch', {
	id: tinyint().primaryKey(),
	epoch: bigint({ mode: 'number', unsigned: true }).notNull(),
	changedAt: now()
});

export const instructionsRelations = relations(instructions, ({ many, one }) => ({
	revisions: many(revisions),
	stations: many(instructionStations),
	process: one(processes, { fields: [instructions.processId], references: [processes.id] }),
	owner: one(people, { fields: [instructions.ownerId], references: [people.id] })
}));

export const revisionsRelations = relations(revisions, ({ one, many }) => ({
	instruction: one(instructions, {
		fields: [revisions.instructionId],
		references: [instructions.id]
	}),
	files: many(revisionFiles),
	comments: many(reviewComments)
}));

export const revisionFilesRelations = relations(revisionFiles, ({ one }) => ({
	revision: one(revisions, { fields: [revisionFiles.revisionId], references: [revisions.id] })
}));

export const reviewCommentsRelations = relations(reviewComments, ({ one }) => ({
	revision: one(revisions, { fields: [reviewComments.revisionId], references: [revisions.id] })
}));

export const instructionStationsRelations = relations(instructionStations, ({ one }) => ({
	instruction: one(instructions, {
		fields: [instructionStations.instructionId],
		references: [instructions.id]
	}),
	station: one(stations, { fields: [instructionStations.stationId], references: [stations.id] })
}));
