// Electronic signatures on revisions: re-authentication, controlled meaning, manifestation and a
// binding to the revision's content hash.
import { and, asc, count, eq, gte } from 'drizzle-orm';
import { db, type DbOrTx, type Tx } from '../db';
import { people, revisions, signatureFailures, signatures } from '../db/schema';
import { recordAuditNow, type Actor } from '../audit';
import { verifySecret } from '../auth/password';
import type { StoredSignatureMeaning } from '../../instructions/vocabulary';
import { computeBindingHash, computeContentHash } from './hash';
import { InstructionError } from './errors';
import { listRevisionFiles } from './queries';

export const SIGNATURE_RECORD_TYPE = 'revision';
/** Failures within the window before signing is refused for a while (and an alert is audited). */
export const SIGNATURE_MAX_FAILURES = 5;
export const SIGNATURE_ALERT_AT = 3;
const WINDOW_MS = 15 * 60_000;

/**
 * Checks the signer's own password again. A wrong password is refused, counted and audited;
 * after SIGNATURE_ALERT_AT failures an alert is audited, after SIGNATURE_MAX_FAILURES signing is
 * refused until the window passes.
 */
export async function reauthenticateSigner(
	actor: Actor & { id: number },
	password: string,
	entity: { id: number; label: string }
): Promise<{ printedName: string }> {
	const since = new Date(Date.now() - WINDOW_MS);
	const [{ n }] = await db
		.select({ n: count() })
		.from(signatureFailures)
		.where(and(eq(signatureFailures.personId, actor.id), gte(signatureFailures.at, since)));
	if (n >= SIGNATURE_MAX_FAILURES) {
		await recordAuditNow(actor, {
			action: 'signature.locked',
			entityType: 'revision',
			entityId: entity.id,
			newValues: { failuresInWindow: n, revision: entity.label },
			reason: 'signing refused after repeated wrong passwords'
		});
		throw new InstructionError(
			429,
			'Signing is locked after repeated wrong passwords. Wait 15 minutes or ask an admin.'
		);
	}
	const [me] = await db
		.select({ displayName: people.displayName, passwordHash: people.passwordHash })
		.from(people)
		.where(eq(people.id, actor.id));
	const ok = await verifySecret(me?.passwordHash, password);
	if (!ok) {
		await db.insert(signatureFailures).values({ personId: actor.id });
		const failures = n + 1;
		await recordAuditNow(actor, {
			action: failures >= SIGNATURE_ALERT_AT ? 'signature.failures_alert' : 'signature.failed',
			entityType: 'revision',
			entityId: entity.id,
			newValues: { failuresInWindow: failures, revision: entity.label },
			reason: 'wrong password at signature'
		});
		throw new InstructionError(400, 'That password did not match. The signature was not made.', {
			password: 'Wrong password.'
		});
	}
	return { printedName: me!.displayName };
}

/** The content hash of a revision as it is now in the database (source and files). */
export async function recomputeRevisionHash(revisionId: number, conn: DbOrTx = db) {
	const [r] = await conn
		.select({ source: revisions.source })
		.from(revisions)
		.where(eq(revisions.id, revisionId));
	if (!r) return null;
	return computeContentHash(r.source, await listRevisionFiles(revisionId, conn));
}

/** Appends a signature row bound to `contentHash`. */
export async function insertSignature(
	tx: Tx,
	s: {
		recordId: number;
		signerId: number;
		printedName: string;
		meaning: StoredSignatureMeaning;
		contentHash: string;
		signedAt: Date;
		recordType?: string;
	}
) {
	const fields = { ...s, recordType: s.recordType ?? SIGNATURE_RECORD_TYPE };
	const bindingHash = computeBindingHash(fields);
	const [{ id }] = await tx
		.insert(signatures)
		.values({ ...fields, bindingHash })
		.$returningId();
	return { id, ...fields, bindingHash };
}

export interface VerifiedSignature {
	id: number;
	printedName: string;
	meaning: StoredSignatureMeaning;
	signedAt: Date;
	contentHash: string;
	valid: boolean;
	problem: string | null;
}

/** Every signature on a revision, each checked against the revision as it is now. */
export async function verifyRevisionSignatures(revisionId: number): Promise<VerifiedSignature[]> {
	const rows = await db
		.select()
		.from(signatures)
		.where(
			and(eq(signatures.recordType, SIGNATURE_RECORD_TYPE), eq(signatures.recordId, revisionId))
		)
		.orderBy(asc(signatures.signedAt));
	if (!rows.length) return [];
	const current = await recomputeRevisionHash(revisionId);
	return rows.map((s) => {
		const binding = computeBindingHash(s);
		let problem: string | null = null;
		if (binding !== s.bindingHash)
			problem = 'Signature invalid: it does not belong to this record.';
		else if (s.contentHash !== current)
			problem = 'Signature invalid: record altered since signing.';
		return {
			id: s.id,
			printedName: s.printedName,
			meaning: s.meaning,
			signedAt: s.signedAt,
			contentHash: s.contentHash,
			valid: problem === null,
			problem
		};
	});
}
