import type { RetentionRecordType } from './vocabulary';

/**
 * Periods used while an admin has not set a rule. Common practice, no source: training records are
 * often kept for the length of employment plus about ten years, access logs for a few years. Local
 * law, customer contracts and the plant's own record-control procedure decide the real periods.
 */
export const DEFAULT_RETENTION_YEARS: Record<RetentionRecordType, number> = {
	training_records: 10,
	gate_log: 3
};

/**
 * Bounds an admin may set, per record type (years). Sanity limits, not law: under a year could drop
 * the evidence behind certificates that are still valid; the upper ends outlast any period we know.
 */
export const RETENTION_YEAR_BOUNDS: Record<RetentionRecordType, { min: number; max: number }> = {
	training_records: { min: 1, max: 50 },
	gate_log: { min: 1, max: 30 }
};

/** What a person's display name becomes when retention anonymises them. */
export const anonymisedName = (personId: number) => `Anonymised person #${personId}`;

/**
 * The employee number placeholder. The `#` cannot be typed into the person form (letters, digits
 * and hyphens only), so a placeholder never collides with a real employee number.
 */
export const anonymisedEmployeeNo = (personId: number) => `ANON#${personId}`;

/** What the run row keeps: ids and counts only, never names or identifiers. */
export interface RetentionSummary {
	asOf: string;
	rules: Record<RetentionRecordType, { years: number; source: 'rule' | 'default' }>;
	training: { due: number; personIds: number[]; held: number; heldPersonIds: number[] };
	gateLog: {
		before: string;
		rows: number;
		batches: { fromId: number; toId: number; count: number }[];
		heldRows: number;
	};
	applied?: {
		anonymised: number;
		gateRowsDeleted: number;
		gateBadgesBlanked: number;
		certificatePdfsRemoved: number;
		sessionsEnded: number;
		messagesRedacted: number;
	};
	/** Stored PDFs removed after the commit; keys that could not be removed are retried next run. */
	storage?: { removed: number; pending: string[] };
}
