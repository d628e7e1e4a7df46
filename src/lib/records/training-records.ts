// The training-record export's vocabulary, shared by the filter schema, the server and the page.
import {
	CERTIFICATE_STATUS_LABELS,
	CERTIFICATE_STATUS_TONES,
	type CertificateStatus
} from '../training/vocabulary';
import type { Role } from '../roles';

/** Who may read and export training records. */
export const RECORDS_ROLES: Role[] = ['hr', 'quality'];

/**
 * The state of a record row: a certificate's derived status (training/status.ts), or, for a
 * person × process without any certificate, whether any training has been recorded yet.
 */
export const RECORD_STATES = [
	'valid',
	'expiring',
	'retraining_due',
	'retraining_overdue',
	'expired',
	'suspended',
	'withdrawn',
	'superseded',
	'in_training',
	'not_started'
] as const satisfies readonly (CertificateStatus | 'in_training' | 'not_started')[];
export type RecordState = (typeof RECORD_STATES)[number];

export const RECORD_STATE_LABELS: Record<RecordState, string> = {
	...CERTIFICATE_STATUS_LABELS,
	in_training: 'In training',
	not_started: 'Not started'
};

export const RECORD_STATE_TONES: Record<
	RecordState,
	'valid' | 'denied' | 'info' | 'warn' | 'neutral' | 'superseded'
> = {
	...CERTIFICATE_STATUS_TONES,
	in_training: 'info',
	not_started: 'neutral'
};

export const isCertificateState = (s: RecordState): s is CertificateStatus =>
	s !== 'in_training' && s !== 'not_started';

/** What a row of the export or the preview holds (instants as Date, plant dates as YYYY-MM-DD). */
export interface TrainingRecord {
	personId: number;
	person: string;
	employeeNo: string;
	line: string | null;
	lineName: string | null;
	employmentType: string;
	agency: string | null;
	process: string;
	processName: string;
	/** Document number of the instruction, e.g. WI-COG-004. */
	instruction: string | null;
	revision: string | null;
	acknowledgedAt: Date | null;
	checkScorePct: number | null;
	checkAttempts: number;
	checkAt: Date | null;
	signoffAt: Date | null;
	signoffSigner: string | null;
	signoffResult: string | null;
	certificateNo: string | null;
	issuedAt: Date | null;
	expiresAt: Date | null;
	state: RecordState;
	assignedAt: Date | null;
}
