import { relations } from 'drizzle-orm';
import {
	bigint,
	boolean,
	datetime,
	int,
	mysqlEnum,
	mysqlTable,
	primaryKey,
	varchar
} from 'drizzle-orm/mysql-core';
import { lines, people } from './people';
import { BOND_TYPES } from '../../../plant';

const id = (name: string) => bigint(name, { mode: 'number', unsigned: true });

export { BOND_TYPES };

export const processes = mysqlTable('processes', {
	id: bigint({ mode: 'number', unsigned: true }).autoincrement().primaryKey(),
	/** Short code, e.g. COG-MB (COG main bond). */
	code: varchar({ length: 32 }).notNull().unique(),
	name: varchar({ length: 200 }).notNull(),
	bondType: mysqlEnum(BOND_TYPES).notNull(),
	active: boolean().notNull().default(true)
});

export const stations = mysqlTable('stations', {
	id: bigint({ mode: 'number', unsigned: true }).autoincrement().primaryKey(),
	lineId: id('line_id')
		.notNull()
		.references(() => lines.id),
	/** e.g. L2-FOG-03 */
	code: varchar({ length: 32 }).notNull().unique(),
	name: varchar({ length: 200 }).notNull(),
	/** Qualified people wanted per shift before the readiness board flags the station. */
	minQualified: int().notNull().default(2),
	active: boolean().notNull().default(true)
});

export const stationProcesses = mysqlTable(
	'station_processes',
	{
		stationId: id('station_id')
			.notNull()
			.references(() => stations.id),
		processId: id('process_id')
			.notNull()
			.references(() => processes.id)
	},
	(t) => [primaryKey({ columns: [t.stationId, t.processId] })]
);

export const API_KEY_SCOPES = ['gate', 'calculators'] as const;

/** Keys for machines (station HMIs, MES). Only a SHA-256 of the secret is kept. */
export const apiKeys = mysqlTable('api_keys', {
	id: bigint({ mode: 'number', unsigned: true }).autoincrement().primaryKey(),
	name: varchar({ length: 200 }).notNull(),
	/** First characters of the key, shown so people can tell keys apart. */
	prefix: varchar({ length: 16 }).notNull(),
	secretHash: varchar({ length: 64 }).notNull().unique(),
	scope: mysqlEnum(API_KEY_SCOPES).notNull(),
	stationId: id('station_id').references(() => stations.id),
	createdBy: id('created_by').references(() => people.id),
	createdAt: datetime({ mode: 'date', fsp: 3 })
		.notNull()
		.$defaultFn(() => new Date()),
	revokedAt: datetime({ mode: 'date', fsp: 3 }),
	lastUsedAt: datetime({ mode: 'date', fsp: 3 })
});

export const stationsRelations = relations(stations, ({ one, many }) => ({
	line: one(lines, { fields: [stations.lineId], references: [lines.id] }),
	processes: many(stationProcesses)
}));

export const stationProcessesRelations = relations(stationProcesses, ({ one }) => ({
	station: one(stations, { fields: [stationProcesses.stationId], references: [stations.id] }),
	process: one(processes, { fields: [stationProcesses.processId], references: [processes.id] })
}));
