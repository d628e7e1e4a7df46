// Expiry reminders: for each certificate that still qualifies, the smallest reminder offset of its
// rule (e.g. 30 or 7 days) that its remaining validity has reached is queued once, under the key
// expiring_<N>:certificate:<id>. A certificate first seen at 5 days gets only the 7-day reminder,
// never a late 30-day one beside it.
import { and, eq, gt, inArray, lte } from 'drizzle-orm';
import { db } from '../db';
import { certificates, certificationRules, mailOutbox, processes } from '../db/schema';
import { queueExpiringMail } from './events';

const DAY_MS = 86_400_000;

/** The reminder offset due for a certificate with `remainingMs` left, or null. */
export function reminderDue(offsets: number[], remainingMs: number): number | null {
	if (remainingMs <= 0) return null;
	const due = [...offsets].sort((a, b) => a - b).find((n) => remainingMs <= n * DAY_MS);
	return due ?? null;
}

export async function queueExpiryReminders(now: Date = new Date()) {
	const rules = await db.select({ days: certificationRules.reminderDays }).from(certificationRules);
	const widest = Math.max(0, ...rules.flatMap((r) => r.days));
	if (!widest) return { queued: 0 };
	const rows = await db
		.select({
			id: certificates.id,
			personId: certificates.personId,
			number: certificates.number,
			expiresAt: certificates.expiresAt,
			offsets: certificationRules.reminderDays,
			processCode: processes.code,
			processName: processes.name
		})
		.from(certificates)
		.innerJoin(certificationRules, eq(certificationRules.id, certificates.ruleId))
		.innerJoin(processes, eq(processes.id, certificates.processId))
		.where(
			and(
				inArray(certificates.state, ['active', 'retraining_due']),
				gt(certificates.expiresAt, now),
				lte(certificates.expiresAt, new Date(now.getTime() + widest * DAY_MS))
			)
		);
	const due = rows
		.map((r) => ({ ...r, days: reminderDue(r.offsets, r.expiresAt.getTime() - now.getTime()) }))
		.filter((r): r is typeof r & { days: number } => r.days != null);
	if (!due.length) return { queued: 0 };
	// Skip the ones already queued without opening a transaction for each.
	const keys = due.map((r) => `expiring_${r.days}:certificate:${r.id}`);
	const done = new Set<string>();
	for (let i = 0; i < keys.length; i += 500) {
		const have = await db
			.select({ k: mailOutbox.dedupeKey })
			.from(mailOutbox)
			.where(inArray(mailOutbox.dedupeKey, keys.slice(i, i + 500)));
		for (const h of have) done.add(h.k);
	}
	let queued = 0;
	for (const r of due) {
		if (done.has(`expiring_${r.days}:certificate:${r.id}`)) continue;
		const res = await db.transaction((tx) =>
			queueExpiringMail(tx, { ...r, certificateId: r.id, now })
		);
		queued += res.queued;
	}
	return { queued };
}
