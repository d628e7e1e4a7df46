// Electronic signatures on revisions: re-authentication, controlled meaning, manifestation and a
// binding to the revision's content hash.
import { and, asc, eq } from 'drizzle-orm';
import { db, type DbOrTx, type Tx } from '../db';
import { revisions, signatures } from '../db/schema';
import type { Actor } from '../audit';
import { reauthenticate } from '../auth/reauth';
import type { StoredSignatureMeaning } from '../../instructions/vocabulary';
import { computeBindingHash, computeContentHash } from './hash';
import { listRevisionFiles } from './queries';

export const SIGNATURE_RECORD_TYPE = 'revision';
/**
 * Checks the signer's own password again (see auth/reauth.ts). Kept under this name because the
 * revision workflow reads better with it.
 */
export async function reauthenticateSigner(
	actor: Actor & { id: number },
	password: string,
	entity: { id: number; label: string }
): Promise<{ printedName: string }> {
	return reauthenticate(actor, password, { type: 'revision', ...entity });
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
