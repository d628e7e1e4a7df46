import { relations } from 'drizzle-orm';
import {
	boolean,
	date,
	datetime,
	index,
	int,
	mysqlEnum,
	mysqlTable,
	primaryKey,
	bigint,
	uniqueIndex,
	varchar
} from 'drizzle-orm/mysql-core';
import { ROLES } from '../../../roles';

const id = (name: string) => bigint(name, { mode: 'number', unsigned: true });
const now = () =>
	datetime({ mode: 'date', fsp: 3 })
		.notNull()
		.$defaultFn(() => new Date());

export const sites = mysqlTable('sites', {
	id: bigint({ mode: 'number', unsigned: true }).autoincrement().primaryKey(),
	code: varchar({ length: 16 }).notNull().unique(),
	name: varchar({ length: 200 }).notNull(),
	/** IANA zone; effective and expiry instants are computed in it. */
	timeZone: varchar({ length: 64 }).notNull()
});

export const lines = mysqlTable(
	'lines',
	{
		id: bigint({ mode: 'number', unsigned: true }).autoincrement().primaryKey(),
		siteId: id('site_id')
			.notNull()
			.references(() => sites.id),
		code: varchar({ length: 16 }).notNull(),
		name: varchar({ length: 200 }).notNull(),
		active: boolean().notNull().default(true)
	},
	(t) => [uniqueIndex('lines_site_code').on(t.siteId, t.code)]
);

export const shifts = mysqlTable(
	'shifts',
	{
		id: bigint({ mode: 'number', unsigned: true }).autoincrement().primaryKey(),
		siteId: id('site_id')
			.notNull()
			.references(() => sites.id),
		code: varchar({ length: 16 }).notNull(),
		name: varchar({ length: 100 }).notNull(),
		/** Local wall-clock times in the site's zone, "HH:MM". A shift may end after midnight. */
		startsAt: varchar({ length: 5 }).notNull(),
		endsAt: varchar({ length: 5 }).notNull()
	},
	(t) => [uniqueIndex('shifts_site_code').on(t.siteId, t.code)]
);

import { EMPLOYMENT_TYPES } from '../../../employment';
export { EMPLOYMENT_TYPES };

export const people = mysqlTable(
	'people',
	{
		id: bigint({ mode: 'number', unsigned: true }).autoincrement().primaryKey(),
		/** Never reused; a rehire reactivates the same row. */
		employeeNo: varchar({ length: 32 }).notNull().unique(),
		displayName: varchar({ length: 200 }).notNull(),
		email: varchar({ length: 254 }).unique(),
		badgeNo: varchar({ length: 64 }).unique(),
		locale: varchar({ length: 16 }).notNull().default('en'),
		employmentType: mysqlEnum(EMPLOYMENT_TYPES).notNull().default('employee'),
		agencyName: varchar({ length: 200 }),
		contractEndsOn: date({ mode: 'string' }),
		siteId: id('site_id').references(() => sites.id),
		lineId: id('line_id').references(() => lines.id),
		shiftId: id('shift_id').references(() => shifts.id),
		active: boolean().notNull().default(true),
		/** Last day of employment (plant date), set on deactivation or contract end, cleared on rehire. */
		employmentEndedOn: date({ mode: 'string' }),
		/** Set when retention dropped the name and identifiers; the row and its records stay. */
		anonymisedAt: datetime({ mode: 'date', fsp: 3 }),
		passwordHash: varchar({ length: 255 }),
		pinHash: varchar({ length: 255 }),
		/** Bumped on deactivation, role change and credential reset; a session with an older value is dead. */
		sessionVersion: int().notNull().default(1),
		createdAt: now(),
		updatedAt: now().$onUpdateFn(() => new Date())
	},
	(t) => [index('people_line').on(t.lineId), index('people_active').on(t.active)]
);

export const roleAssignments = mysqlTable(
	'role_assignments',
	{
		personId: id('person_id')
			.notNull()
			.references(() => people.id),
		role: mysqlEnum(ROLES).notNull(),
		grantedAt: now()
	},
	(t) => [primaryKey({ columns: [t.personId, t.role] })]
);

export const signInFailures = mysqlTable(
	'sign_in_failures',
	{
		id: bigint({ mode: 'number', unsigned: true }).autoincrement().primaryKey(),
		keyType: mysqlEnum(['account', 'address']).notNull(),
		keyValue: varchar({ length: 255 }).notNull(),
		at: now()
	},
	(t) => [index('sign_in_failures_key').on(t.keyType, t.keyValue, t.at)]
);

export const peopleRelations = relations(people, ({ many, one }) => ({
	roles: many(roleAssignments),
	site: one(sites, { fields: [people.siteId], references: [sites.id] }),
	line: one(lines, { fields: [people.lineId], references: [lines.id] }),
	shift: one(shifts, { fields: [people.shiftId], references: [shifts.id] })
}));

export const roleAssignmentsRelations = relations(roleAssignments, ({ one }) => ({
	person: one(people, { fields: [roleAssignments.personId], references: [people.id] })
}));

/** One row per sign-in; the JWT carries its id, and every request checks it is still open. */
export const authSessions = mysqlTable(
	'auth_sessions',
	{
		id: varchar({ length: 43 }).primaryKey(),
		personId: id('person_id')
			.notNull()
			.references(() => people.id),
		/** The person's sessionVersion when the session began. */
		sessionVersion: int().notNull(),
		method: mysqlEnum(['password', 'badge']).notNull(),
		address: varchar({ length: 64 }),
		createdAt: now(),
		expiresAt: datetime({ mode: 'date', fsp: 3 }).notNull(),
		revokedAt: datetime({ mode: 'date', fsp: 3 })
	},
	(t) => [index('auth_sessions_person').on(t.personId)]
);
