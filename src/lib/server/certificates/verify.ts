// The public verification behind a certificate's QR code: found by the sha256 of the token only,
// rate-limited per client address, and answering with as little personal data as the rule allows.
import { and, count, eq, gte, lt } from 'drizzle-orm';
import { db } from '../db';
import {
	certificates,
	certificationRules,
	people,
	processes,
	sites,
	verifyHits
} from '../db/schema';
import { config } from '../config';
import { Refusal } from '../errors';
import { deriveCertificateStatus } from '../../training/status';
import type { CertificateStatus } from '../../training/vocabulary';
import { expiringWindowDays } from '../training/rules';
import { hashVerifyToken } from './issue';

export { hashVerifyToken };

/** "Trần Thị Thu Hà" → "T. T. T. H."; a name written without spaces gives its first character. */
export function initialsOf(name: string): string {
	return name
		.normalize('NFC')
		.trim()
		.split(/\s+/)
		.filter(Boolean)
		.map((part) => `${Array.from(part)[0]?.toLocaleUpperCase() ?? ''}.`)
		.join(' ');
}

export interface VerifyView {
	holder: string;
	holderIsInitials: boolean;
	processName: string;
	processCode: string;
	status: CertificateStatus;
	expiresAt: Date;
	plantName: string;
	timeZone: string;
}

/**
 * Counts this lookup against the address and refuses with 429 over the limit, then looks the token
 * up. Returns null when no certificate matches.
 */
export async function verifyCertificateToken(
	token: string,
	address: string,
	now: Date = new Date()
): Promise<VerifyView | null> {
	const { windowMinutes, maxPerWindow } = config.verify;
	const since = new Date(now.getTime() - windowMinutes * 60_000);
	const key = address.slice(0, 64);
	const [{ n }] = await db
		.select({ n: count() })
		.from(verifyHits)
		.where(and(eq(verifyHits.address, key), gte(verifyHits.at, since)));
	if (n >= maxPerWindow)
		throw new Refusal(
			429,
			`Too many look-ups from this address. Wait ${windowMinutes} minutes and scan the code again.`
		);
	await db.insert(verifyHits).values({ address: key, at: now });
	// Old rows of this address are no longer counted; keep the table small.
	await db.delete(verifyHits).where(and(eq(verifyHits.address, key), lt(verifyHits.at, since)));

	// Tokens are base64url; anything else cannot match and is not even looked up.
	if (!/^[A-Za-z0-9_-]{16,128}$/.test(token)) return null;
	const [c] = await db
		.select({
			state: certificates.state,
			expiresAt: certificates.expiresAt,
			graceUntil: certificates.graceUntil,
			holderName: people.displayName,
			processName: processes.name,
			processCode: processes.code,
			reminderDays: certificationRules.reminderDays,
			showFullName: certificationRules.showFullNameOnVerify,
			siteName: sites.name,
			timeZone: sites.timeZone
		})
		.from(certificates)
		.innerJoin(people, eq(people.id, certificates.personId))
		.innerJoin(processes, eq(processes.id, certificates.processId))
		.innerJoin(certificationRules, eq(certificationRules.id, certificates.ruleId))
		.leftJoin(sites, eq(sites.id, people.siteId))
		.where(eq(certificates.verifyTokenHash, hashVerifyToken(token)));
	if (!c) return null;
	return {
		holder: c.showFullName ? c.holderName : initialsOf(c.holderName),
		holderIsInitials: !c.showFullName,
		processName: c.processName,
		processCode: c.processCode,
		status: deriveCertificateStatus(c, now, expiringWindowDays(c)),
		expiresAt: c.expiresAt,
		plantName: config.plantName,
		timeZone: c.timeZone ?? 'Asia/Ho_Chi_Minh'
	};
}
