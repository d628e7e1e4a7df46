// Controlled vocabularies of training and certification, shared by schema, server and pages.

/** How a process was assigned to a person. */
export const ASSIGNMENT_SCOPES = ['person', 'line', 'station'] as const;
export type AssignmentScope = (typeof ASSIGNMENT_SCOPES)[number];

/** Authoring states of a knowledge check version (reviewed and approved like an instruction). */
export const CHECK_STATES = ['draft', 'in_review', 'approved', 'retired'] as const;
export type CheckState = (typeof CHECK_STATES)[number];

export const QUESTION_KINDS = [
	'single',
	'multiple',
	'true_false',
	'numeric',
	'calculated'
] as const;
export type QuestionKind = (typeof QUESTION_KINDS)[number];

export const QUESTION_KIND_LABELS: Record<QuestionKind, string> = {
	single: 'Single choice',
	multiple: 'Multiple choice',
	true_false: 'True / false',
	numeric: 'Numeric with unit and tolerance',
	calculated: 'Calculated (parameters drawn per attempt, key from a calculator)'
};

export const ATTEMPT_STATES = ['open', 'submitted', 'timed_out'] as const;
export type AttemptState = (typeof ATTEMPT_STATES)[number];

export const SIGNOFF_STATES = ['draft', 'trainer_signed', 'countersigned', 'failed'] as const;
export type SignoffState = (typeof SIGNOFF_STATES)[number];

/**
 * Stored certificate states. 'active' covers valid and expiring (expiring is a window before
 * expiry, derived from the clock); 'expired' and 'retraining_due' are persisted by the lifecycle
 * job, and reading derives them from the clock anyway, so the gate is right at the exact instant.
 */
export const CERTIFICATE_STATES = [
	'active',
	'retraining_due',
	'expired',
	'suspended',
	'withdrawn',
	'superseded'
] as const;
export type CertificateState = (typeof CERTIFICATE_STATES)[number];

/** What a person sees: the stored state plus what the clock says. */
export type CertificateStatus =
	| 'valid'
	| 'expiring'
	| 'retraining_due'
	| 'retraining_overdue'
	| 'expired'
	| 'suspended'
	| 'withdrawn'
	| 'superseded';

export const CERTIFICATE_STATUS_LABELS: Record<CertificateStatus, string> = {
	valid: 'Valid',
	expiring: 'Expiring soon',
	retraining_due: 'Retraining due (grace)',
	retraining_overdue: 'Retraining overdue',
	expired: 'Expired',
	suspended: 'Suspended',
	withdrawn: 'Withdrawn',
	superseded: 'Superseded'
};

/** Statuses under which a certificate still qualifies its holder (with a warning for some). */
export const QUALIFYING_STATUSES: readonly CertificateStatus[] = [
	'valid',
	'expiring',
	'retraining_due'
];

export const BASIS_KINDS = ['acknowledgement', 'attempt', 'signoff'] as const;
export type BasisKind = (typeof BASIS_KINDS)[number];

export const CERTIFICATE_STATUS_TONES: Record<
	CertificateStatus,
	'valid' | 'denied' | 'info' | 'warn' | 'neutral' | 'superseded'
> = {
	valid: 'valid',
	expiring: 'warn',
	retraining_due: 'warn',
	retraining_overdue: 'denied',
	expired: 'denied',
	suspended: 'denied',
	withdrawn: 'denied',
	superseded: 'superseded'
};
