// Words of the training history, shared by the server (PDF) and the pages.

/** What happened to a certificate, as the history lists it (from the audit trail). */
export const CERTIFICATE_EVENT_KINDS = [
	'issued',
	'superseded',
	'suspended',
	'reinstated',
	'withdrawn',
	'expired',
	'retraining_due'
] as const;
export type CertificateEventKind = (typeof CERTIFICATE_EVENT_KINDS)[number];

export const CERTIFICATE_EVENT_LABELS: Record<CertificateEventKind, string> = {
	issued: 'Issued',
	superseded: 'Superseded',
	suspended: 'Suspended',
	reinstated: 'Reinstated',
	withdrawn: 'Withdrawn',
	expired: 'Expired',
	retraining_due: 'Retraining due'
};
