// The status a person sees for a certificate: its stored state read against the clock. Pure, so the
// gate, the board, the pages and the lifecycle job all agree at the exact instant.
import type { CertificateState, CertificateStatus } from './vocabulary';

export interface CertificateClockFields {
	state: CertificateState;
	expiresAt: Date;
	graceUntil: Date | null;
}

const DAY_MS = 86_400_000;

/**
 * `expiringDays` is the widest reminder offset of the rule the certificate was issued under: from
 * that many days before expiry the certificate reads "expiring".
 */
export function deriveCertificateStatus(
	c: CertificateClockFields,
	now: Date,
	expiringDays: number
): CertificateStatus {
	if (c.state === 'withdrawn' || c.state === 'suspended' || c.state === 'superseded')
		return c.state;
	if (c.state === 'expired' || now.getTime() >= c.expiresAt.getTime()) return 'expired';
	if (c.state === 'retraining_due') {
		return c.graceUntil && now.getTime() < c.graceUntil.getTime()
			? 'retraining_due'
			: 'retraining_overdue';
	}
	if (c.expiresAt.getTime() - now.getTime() <= expiringDays * DAY_MS) return 'expiring';
	return 'valid';
}

/** Whole days left until expiry (0 on the last day), for "expires in N days". */
export function daysToExpiry(expiresAt: Date, now: Date): number {
	return Math.max(0, Math.floor((expiresAt.getTime() - now.getTime()) / DAY_MS));
}

export function isQualifying(status: CertificateStatus): boolean {
	return status === 'valid' || status === 'expiring' || status === 'retraining_due';
}
