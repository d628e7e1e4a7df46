// Reading certificates with their status derived at the instant asked about.
import { and, desc, eq } from 'drizzle-orm';
import { db, type DbOrTx } from '../db';
import { certificates, certificationRules } from '../db/schema';
import { deriveCertificateStatus, isQualifying } from '../../training/status';
import type { CertificateStatus } from '../../training/vocabulary';
import { expiringWindowDays } from '../training/rules';

export interface CertificateWithStatus {
	id: number;
	number: string;
	personId: number;
	processId: number;
	status: CertificateStatus;
	issuedAt: Date;
	expiresAt: Date;
	graceUntil: Date | null;
}

/** Every certificate of a person for a process, newest first, with its status at `now`. */
export async function certificatesOf(
	personId: number,
	processId: number | null,
	now: Date = new Date(),
	conn: DbOrTx = db
): Promise<CertificateWithStatus[]> {
	const rows = await conn
		.select({
			id: certificates.id,
			number: certificates.number,
			personId: certificates.personId,
			processId: certificates.processId,
			state: certificates.state,
			issuedAt: certificates.issuedAt,
			expiresAt: certificates.expiresAt,
			graceUntil: certificates.graceUntil,
			reminderDays: certificationRules.reminderDays
		})
		.from(certificates)
		.innerJoin(certificationRules, eq(certificationRules.id, certificates.ruleId))
		.where(
			and(
				eq(certificates.personId, personId),
				processId == null ? undefined : eq(certificates.processId, processId)
			)
		)
		.orderBy(desc(certificates.issuedAt), desc(certificates.id));
	return rows.map((r) => ({
		id: r.id,
		number: r.number,
		personId: r.personId,
		processId: r.processId,
		status: deriveCertificateStatus(r, now, expiringWindowDays(r)),
		issuedAt: r.issuedAt,
		expiresAt: r.expiresAt,
		graceUntil: r.graceUntil
	}));
}

/**
 * A certificate that qualifies the person for the process at `now` (valid, expiring, or
 * retraining due within grace), or null.
 */
export async function qualifyingCertificate(
	personId: number,
	processId: number,
	now: Date = new Date(),
	conn: DbOrTx = db
): Promise<{ id: number; number: string; status: CertificateStatus } | null> {
	const list = await certificatesOf(personId, processId, now, conn);
	const q = list.find((c) => isQualifying(c.status));
	return q ? { id: q.id, number: q.number, status: q.status } : null;
}
