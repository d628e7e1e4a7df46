// Certificate transitions that happen on time, without anyone clicking: expiry, and retraining due
// when a revision that needs retraining becomes effective. Run by the scheduler every minute and
// idempotent (a second run at the same instant changes nothing). Reading derives the same status
// from the clock (training/status.ts), so the gate is right even between two runs.
import { and, eq, inArray, lte, sql } from 'drizzle-orm';
import { alias } from 'drizzle-orm/mysql-core';
import { db } from '../db';
import {
	certificateBasis,
	certificates,
	certificationRules,
	revisions,
	instructions
} from '../db/schema';
import { recordAudit } from '../audit';
import { queueRetrainingMail } from '../mail/events';

const DAY_MS = 86_400_000;
const BATCH = 500;

export interface LifecycleResult {
	expired: number;
	retrainingDue: number;
}

/** Applies every transition due at `now`. */
export async function runCertificateLifecycle(now: Date = new Date()): Promise<LifecycleResult> {
	const expired = await expireCertificates(now);
	const retrainingDue = await markRetrainingDue(now);
	return { expired, retrainingDue };
}

/** active / retraining_due certificates whose expiry instant has passed become expired. */
export async function expireCertificates(now: Date): Promise<number> {
	let total = 0;
	for (;;) {
		const n = await db.transaction(async (tx) => {
			const due = await tx
				.select({
					id: certificates.id,
					number: certificates.number,
					state: certificates.state,
					expiresAt: certificates.expiresAt
				})
				.from(certificates)
				.where(
					and(
						inArray(certificates.state, ['active', 'retraining_due']),
						lte(certificates.expiresAt, now)
					)
				)
				.limit(BATCH)
				.for('update', { skipLocked: true });
			if (!due.length) return 0;
			await tx
				.update(certificates)
				.set({
					state: 'expired',
					stateChangedAt: now,
					stateReason: 'validity ended',
					stateChangedBy: null
				})
				.where(
					inArray(
						certificates.id,
						due.map((d) => d.id)
					)
				);
			for (const d of due) {
				await recordAudit(tx, null, {
					action: 'certificate.expired',
					entityType: 'certificate',
					entityId: d.id,
					oldValues: { state: d.state },
					newValues: { state: 'expired', number: d.number, expiresAt: d.expiresAt.toISOString() },
					reason: 'validity ended'
				});
			}
			return due.length;
		});
		total += n;
		if (n < BATCH) return total;
	}
}

/**
 * Active certificates whose basis acknowledges an older revision of an instruction that now has
 * an effective revision needing retraining, issued before that revision became effective, become
 * retraining due; grace runs from the revision's effective instant for the rule's grace days.
 */
export async function markRetrainingDue(now: Date): Promise<number> {
	const basisRev = alias(revisions, 'basis_rev');
	const newer = alias(revisions, 'newer_rev');
	let total = 0;
	for (;;) {
		const n = await db.transaction(async (tx) => {
			const rows = await tx
				.select({
					id: certificates.id,
					number: certificates.number,
					graceDays: certificationRules.graceDays,
					newerId: newer.id,
					newerLetter: newer.letter,
					newerFrom: newer.effectiveFrom,
					docNumber: instructions.docNumber
				})
				.from(certificates)
				.innerJoin(certificationRules, eq(certificationRules.id, certificates.ruleId))
				.innerJoin(
					certificateBasis,
					and(
						eq(certificateBasis.certificateId, certificates.id),
						eq(certificateBasis.kind, 'acknowledgement')
					)
				)
				.innerJoin(basisRev, eq(basisRev.id, certificateBasis.revisionId))
				.innerJoin(
					newer,
					and(
						eq(newer.instructionId, basisRev.instructionId),
						eq(newer.classification, 'retraining'),
						inArray(newer.state, ['approved', 'superseded']),
						lte(newer.effectiveFrom, now),
						sql`${newer.effectiveFrom} > ${basisRev.effectiveFrom}`,
						sql`${newer.effectiveFrom} > ${certificates.issuedAt}`
					)
				)
				.innerJoin(instructions, eq(instructions.id, newer.instructionId))
				.where(eq(certificates.state, 'active'))
				.orderBy(certificates.id, newer.effectiveFrom)
				.limit(BATCH)
				.for('update', { skipLocked: true });
			if (!rows.length) return 0;
			// The earliest retraining revision per certificate starts its grace.
			const first = new Map<number, (typeof rows)[number]>();
			for (const r of rows) if (!first.has(r.id)) first.set(r.id, r);
			for (const r of first.values()) {
				const graceUntil = new Date(r.newerFrom!.getTime() + r.graceDays * DAY_MS);
				await tx
					.update(certificates)
					.set({
						state: 'retraining_due',
						retrainingRevisionId: r.newerId,
						graceUntil,
						stateChangedAt: now,
						stateReason: `${r.docNumber} rev ${r.newerLetter} needs retraining`,
						stateChangedBy: null
					})
					.where(and(eq(certificates.id, r.id), eq(certificates.state, 'active')));
				await recordAudit(tx, null, {
					action: 'certificate.retraining_due',
					entityType: 'certificate',
					entityId: r.id,
					oldValues: { state: 'active' },
					newValues: {
						state: 'retraining_due',
						number: r.number,
						revision: `${r.docNumber} rev ${r.newerLetter}`,
						graceUntil: graceUntil.toISOString()
					},
					reason: 'a revision that needs retraining became effective'
				});
				await queueRetrainingMail(tx, {
					certificateId: r.id,
					revisionId: r.newerId,
					docNumber: r.docNumber,
					letter: r.newerLetter,
					graceUntil,
					now
				});
			}
			return first.size;
		});
		total += n;
		if (n === 0 || n < BATCH) return total;
	}
}
