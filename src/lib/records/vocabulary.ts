/** Record types an admin sets a retention period for (years). */
export const RETENTION_RECORD_TYPES = ['training_records', 'gate_log'] as const;
export type RetentionRecordType = (typeof RETENTION_RECORD_TYPES)[number];

export const RETENTION_RECORD_LABELS: Record<RetentionRecordType, string> = {
	training_records: 'Training records (from the end of employment)',
	gate_log: 'Station gate log (from each decision)'
};

/** What a retention run did to one record (or one batch of gate log rows). */
export const DISPOSITION_ACTIONS = ['anonymised', 'deleted'] as const;
export type DispositionAction = (typeof DISPOSITION_ACTIONS)[number];

/** Identifier kinds that stay retired after anonymisation so they are never handed out again. */
export const RETIRED_IDENTIFIER_KINDS = ['employee_no', 'badge_no', 'email'] as const;
export type RetiredIdentifierKind = (typeof RETIRED_IDENTIFIER_KINDS)[number];
