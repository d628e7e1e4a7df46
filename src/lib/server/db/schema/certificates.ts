import {
	bigint,
	char,
	datetime,
	index,
	mysqlEnum,
	mysqlTable,
	primaryKey,
	text,
	varchar
} from 'drizzle-orm/mysql-core';
import { people } from './people';
import { processes } from './stations';
import { revisions } from './instructions';
import { certificationRules } from './training';
import { BASIS_KINDS, CERTIFICATE_STATES } from '../../../training/vocabulary';

const id = (name: string) => bigint(name, { mode: 'number', unsigned: true });
const instant = () => datetime({ mode: 'date', fsp: 3 });

/**
 * A certificate: issued in one transaction with its basis rows and audit event. Renewal issues a
 * new row that points back (previousId) and marks the old one superseded, keeping the chain.
 */
export const certificates = mysqlTable(
	'certificates',
	{
		id: bigint({ mode: 'number', unsigned: true }).autoincrement().primaryKey(),
		/** e.g. KBO2-COGMB-2026-00042 */
		number: varchar({ length: 40 }).notNull().unique(),
		personId: id('person_id')
			.notNull()
			.references(() => people.id),
		processId: id('process_id')
			.notNull()
			.references(() => processes.id),
		ruleId: id('rule_id')
			.notNull()
			.references(() => certificationRules.id),
		state: mysqlEnum(CERTIFICATE_STATES).notNull().default('active'),
		issuedAt: instant().notNull(),
		/** The exact instant of expiry: the end of the expiry day in the site's time zone. */
		expiresAt: instant().notNull(),
		/** Null when the system issued on a met rule; the trainer otherwise. */
		issuedBy: id('issued_by').references(() => people.id),
		/** The signer's manifestation printed on the certificate. */
		signerName: varchar({ length: 200 }).notNull(),
		signerRole: varchar({ length: 100 }).notNull(),
		/** sha256 of the verification token; the token itself is only in the PDF's QR code. */
		verifyTokenHash: char({ length: 64 }).notNull().unique(),
		/** Object key of the PDF made at issue time. */
		pdfKey: varchar({ length: 200 }),
		previousId: id('previous_id'),
		/** Set when a retraining-required revision made this certificate retraining-due. */
		retrainingRevisionId: id('retraining_revision_id').references(() => revisions.id),
		graceUntil: instant(),
		stateReason: text(),
		stateChangedAt: instant(),
		stateChangedBy: id('state_changed_by').references(() => people.id)
	},
	(t) => [
		index('certificates_person_process').on(t.personId, t.processId),
		index('certificates_state_expiry').on(t.state, t.expiresAt)
	]
);

/** The records a certificate was issued on: acknowledgements, the passed attempt, the sign-off. */
export const certificateBasis = mysqlTable(
	'certificate_basis',
	{
		certificateId: id('certificate_id')
			.notNull()
			.references(() => certificates.id),
		kind: mysqlEnum(BASIS_KINDS).notNull(),
		refId: id('ref_id').notNull(),
		/** The instruction revision the record is about (acknowledged / checked / signed against). */
		revisionId: id('revision_id').references(() => revisions.id)
	},
	(t) => [
		primaryKey({ columns: [t.certificateId, t.kind, t.refId] }),
		index('certificate_basis_revision').on(t.revisionId)
	]
);

/** Failed lookups on the public verification page, counted per address to rate-limit it. */
export const verifyHits = mysqlTable(
	'verify_hits',
	{
		id: bigint({ mode: 'number', unsigned: true }).autoincrement().primaryKey(),
		address: varchar({ length: 64 }).notNull(),
		at: instant()
			.notNull()
			.$defaultFn(() => new Date())
	},
	(t) => [index('verify_hits_address').on(t.address, t.at)]
);

/** Leases for scheduled jobs: whoever holds an unexpired lease runs the job; others skip it. */
export const jobLeases = mysqlTable('job_leases', {
	name: varchar({ length: 64 }).primaryKey(),
	holder: varchar({ length: 100 }),
	leaseUntil: instant(),
	lastRunAt: instant(),
	lastResult: text()
});
