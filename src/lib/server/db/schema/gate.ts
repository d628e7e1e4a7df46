import {
	bigint,
	datetime,
	index,
	int,
	json,
	mysqlEnum,
	mysqlTable,
	text,
	varchar
} from 'drizzle-orm/mysql-core';
import { people } from './people';
import { apiKeys, stations } from './stations';

const id = (name: string) => bigint(name, { mode: 'number', unsigned: true });
const instant = () => datetime({ mode: 'date', fsp: 3 });

export const GATE_DECISIONS = ['allow', 'deny'] as const;

/**
 * Every station gate decision, append-only: what was asked (station, badge as presented), who it
 * resolved to, the decision with its reasons and warnings, and which key or terminal asked.
 */
export const gateChecks = mysqlTable(
	'gate_checks',
	{
		id: bigint({ mode: 'number', unsigned: true }).autoincrement().primaryKey(),
		at: instant().notNull(),
		stationId: id('station_id').references(() => stations.id),
		stationCode: varchar({ length: 64 }).notNull(),
		badge: varchar({ length: 64 }).notNull(),
		personId: id('person_id').references(() => people.id),
		decision: mysqlEnum(GATE_DECISIONS).notNull(),
		reasons: json().$type<{ code: string; process?: string; detail?: string }[]>().notNull(),
		warnings: json().$type<{ code: string; process?: string; detail?: string }[]>().notNull(),
		source: mysqlEnum(['api', 'kiosk']).notNull(),
		apiKeyId: id('api_key_id').references(() => apiKeys.id),
		latencyMs: int().notNull()
	},
	(t) => [
		index('gate_checks_station_at').on(t.stationId, t.at),
		index('gate_checks_person_at').on(t.personId, t.at),
		index('gate_checks_at').on(t.at)
	]
);

/** A time-boxed run under a qualified supervisor, granted by a line lead (at most one shift). */
export const supervisedRuns = mysqlTable(
	'supervised_runs',
	{
		id: bigint({ mode: 'number', unsigned: true }).autoincrement().primaryKey(),
		personId: id('person_id')
			.notNull()
			.references(() => people.id),
		stationId: id('station_id')
			.notNull()
			.references(() => stations.id),
		supervisorId: id('supervisor_id')
			.notNull()
			.references(() => people.id),
		grantedBy: id('granted_by')
			.notNull()
			.references(() => people.id),
		reason: text().notNull(),
		startsAt: instant().notNull(),
		endsAt: instant().notNull(),
		revokedAt: instant(),
		revokedBy: id('revoked_by').references(() => people.id),
		revokeReason: text(),
		createdAt: instant().notNull()
	},
	(t) => [index('supervised_runs_person_station').on(t.personId, t.stationId, t.endsAt)]
);

export const MAIL_KINDS = [
	'review_requested',
	'retraining_needed',
	'assignment',
	'expiring_30',
	'expiring_7',
	'suspended',
	'supervised_run',
	'lead_digest'
] as const;

/**
 * Outgoing mail, written in the same transaction as the event that causes it. A worker sends
 * each row once: `dedupeKey` is unique, a row is claimed with a lease before sending, and
 * `sentAt` is set in the same step that releases the claim.
 */
export const mailOutbox = mysqlTable(
	'mail_outbox',
	{
		id: bigint({ mode: 'number', unsigned: true }).autoincrement().primaryKey(),
		/** e.g. expiring_30:certificate:42 — the same event never queues two messages. */
		dedupeKey: varchar({ length: 200 }).notNull().unique(),
		kind: mysqlEnum(MAIL_KINDS).notNull(),
		toAddress: varchar({ length: 254 }).notNull(),
		/** The person the address belongs to (a lead receiving for an operator without e-mail). */
		toPersonId: id('to_person_id').references(() => people.id),
		/** The person the message is about, who sees it under "my messages". */
		aboutPersonId: id('about_person_id').references(() => people.id),
		subject: varchar({ length: 300 }).notNull(),
		textBody: text().notNull(),
		htmlBody: text().notNull(),
		createdAt: instant().notNull(),
		/** Not before this instant (retries back off by moving it). */
		sendAfter: instant().notNull(),
		attempts: int().notNull().default(0),
		lastError: text(),
		claimedBy: varchar({ length: 100 }),
		claimedUntil: instant(),
		sentAt: instant(),
		messageId: varchar({ length: 300 })
	},
	(t) => [
		index('mail_outbox_pending').on(t.sentAt, t.sendAfter),
		index('mail_outbox_to').on(t.toPersonId),
		index('mail_outbox_about').on(t.aboutPersonId)
	]
);
