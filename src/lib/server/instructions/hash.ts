import { createHash } from 'node:crypto';

const sha256 = (s: string) => createHash('sha256').update(s, 'utf8').digest('hex');

export interface HashedFile {
	originalName: string;
	sha256: string;
}

/** sha256 over what a signature vouches for: the Markdown source and every file of the revision. */
export function computeContentHash(source: string, files: readonly HashedFile[]): string {
	const list = files
		.map((f) => [f.originalName, f.sha256])
		.sort((a, b) => (a[0] < b[0] ? -1 : a[0] > b[0] ? 1 : 0));
	return sha256(JSON.stringify({ source, files: list }));
}

export interface SignatureFields {
	recordType: string;
	recordId: number;
	signerId: number;
	printedName: string;
	meaning: string;
	signedAt: Date;
	contentHash: string;
}

/** Binds a signature row to its own record: copied to another record id, it no longer verifies. */
export function computeBindingHash(s: SignatureFields): string {
	return sha256(
		JSON.stringify([
			s.recordType,
			s.recordId,
			s.signerId,
			s.printedName,
			s.meaning,
			s.signedAt.toISOString(),
			s.contentHash
		])
	);
}
