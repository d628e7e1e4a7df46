import {
	bigint,
	char,
	datetime,
	index,
	json,
	mysqlTable,
	text,
	tinyint,
	varchar
} from 'drizzle-orm/mysql-core';

/**
 * Append-only audit trail. The app's database user holds only INSERT and SELECT on this table
 * (grantAppUser in scripts/lib.js sets the grants). Each row's hash covers its content and the previous row's hash.
 */
export const auditEvents = mysqlTable(
	'audit_events',
	{
		seq: bigint({ mode: 'number', unsigned: true }).primaryKey(),
		at: datetime({ mode: 'date', fsp: 3 }).notNull(),
		actorId: bigint({ mode: 'number', unsigned: true }),
		actorLabel: varchar({ length: 200 }).notNull(),
		action: varchar({ length: 64 }).notNull(),
		entityType: varchar({ length: 64 }).notNull(),
		entityId: varchar({ length: 64 }),
		oldValues: json(),
		newValues: json(),
		reason: text(),
		address: varchar({ length: 64 }),
		prevHash: char({ length: 64 }).notNull(),
		hash: char({ length: 64 }).notNull()
	},
	(t) => [
		index('audit_entity').on(t.entityType, t.entityId),
		index('audit_actor').on(t.actorId),
		index('audit_at').on(t.at),
		index('audit_action').on(t.action)
	]
);

/** One row that serialises writers of the chain (locked FOR UPDATE inside each transaction). */
export const auditChain = mysqlTable('audit_chain', {
	id: tinyint().primaryKey(),
	lastSeq: bigint({ mode: 'number', unsigned: true }).notNull(),
	lastHash: char({ length: 64 }).notNull()
});
