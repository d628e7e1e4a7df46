// STAND-IN until the lead's certificates/queries.ts lands on main; on merge, main's file wins.
// Same signature as announced: the person's certificate for a process that still qualifies them.
import { and, desc, eq } from 'drizzle-orm';
import { db } from '../db';
import { certificates, certificationRules } from '../db/schema';
import { deriveCertificateStatus, isQualifying } from '../../training/status';
import type { CertificateStatus } from '../../training/vocabulary';
import { expiringWindowDays } from '../training/rules';

export async function qualifyingCertificate(
	personId: number,
	processId: number,
	now: Date = new Date()
): Promise<{ id: number; number: string; status: CertificateStatus } | null> {
	const rows = await db
		.select({
			id: certificates.id,
			number: certificates.number,
			state: certificates.state,
			expiresAt: certificates.expiresAt,
			graceUntil: certificates.graceUntil,
			reminderDays: certificationRules.reminderDays
		})
		.from(certificates)
		.innerJoin(certificationRules, eq(certificationRules.id, certificates.ruleId))
		.where(and(eq(certificates.personId, personId), eq(certificates.processId, processId)))
		.orderBy(desc(certificates.issuedAt));
	for (const r of rows) {
		const status = deriveCertificateStatus(r, now, expiringWindowDays(r));
		if (isQualifying(status)) return { id: r.id, number: r.number, status };
	}
	return null;
}
