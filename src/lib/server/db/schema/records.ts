import {
	bigint,
	boolean,
	char,
	datetime,
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
import { people } from './people';
import {
	DISPOSITION_ACTIONS,
	RETENTION_RECORD_TYPES,
	RETIRED_IDENTIFIER_KINDS
} from '../../../records/vocabulary';

const id = (name: string) => bigint(name, { mode: 'number', unsigned: true });
const instant = () => datetime({ mode: 'date', fsp: 3 });

/** How long each record type is kept; set by admin, one row per type. */
export const retentionRules = mysqlTable('retention_rules', {
	recordType: mysqlEnum(RETENTION_RECORD_TYPES).primaryKey(),
	years: int().notNull(),
	updatedBy: id('updated_by').references(() => people.id),
	updatedAt: instant().notNull()
});

/** A legal hold keeps a person's records out of every retention run until it is released. */
export const legalHolds = mysqlTable(
	'legal_holds',
	{
		id: bigint({ mode: 'number', unsigned: true }).autoincrement().primaryKey(),
		personId: id('person_id')
			.notNull()
			.references(() => people.id),
		reason: text().notNull(),
		placedBy: id('placed_by')
			.notNull()
			.references(() => people.id),
		placedAt: instant().notNull(),
		releasedBy: id('released_by').references(() => people.id),
		releasedAt: instant(),
		releaseReason: text()
	},
	(t) => [index('legal_holds_person').on(t.personId, t.releasedAt)]
);

/** One run of the retention job (dry runs are recorded too, with what they would have done). */
export const retentionRuns = mysqlTable('retention_runs', {
	id: bigint({ mode: 'number', unsigned: true }).autoincrement().primaryKey(),
	dryRun: boolean().notNull(),
	/** Null when the scheduler ran it. */
	actorId: id('actor_id').references(() => people.id),
	startedAt: instant().notNull(),
	finishedAt: instant(),
	/** Counts per record type and action. */
	summary: json()
});

/** What a real run did, one row per record (a person) or per batch (gate log rows). */
export const retentionDispositions = mysqlTable(
	'retention_dispositions',
	{
		id: bigint({ mode: 'number', unsigned: true }).autoincrement().primaryKey(),
		runId: id('run_id')
			.notNull()
			.references(() => retentionRuns.id),
		recordType: mysqlEnum(RETENTION_RECORD_TYPES).notNull(),
		entityType: varchar({ length: 64 }).notNull(),
		entityId: varchar({ length: 64 }).notNull(),
		action: mysqlEnum(DISPOSITION_ACTIONS).notNull(),
		/** The rule applied and, for batches, the range and row count. */
		detail: json().notNull(),
		at: instant().notNull()
	},
	(t) => [
		index('retention_dispositions_run').on(t.runId),
		uniqueIndex('retention_dispositions_once').on(t.recordType, t.entityType, t.entityId, t.action)
	]
);

/**
 * SHA-256 of identifiers dropped by anonymisation: an employee number, badge or e-mail is never
 * handed to anyone else afterwards, though the value itself is gone.
 */
export const retiredIdentifiers = mysqlTable(
	'retired_identifiers',
	{
		kind: mysqlEnum(RETIRED_IDENTIFIER_KINDS).notNull(),
		valueSha256: char({ length: 64 }).notNull(),
		retiredAt: instant().notNull()
	},
	(t) => [primaryKey({ columns: [t.kind, t.valueSha256] })]
);
