/** A refusal the user should see: HTTP status, a clear message and optional field errors. */
export class InstructionError extends Error {
	constructor(
		public status: 400 | 403 | 404 | 409 | 413 | 415 | 422 | 429,
		message: string,
		public fields?: Record<string, string>,
		public detail?: Record<string, unknown>
	) {
		super(message);
	}
}

export const notFound = (what = 'No such instruction or revision') =>
	new InstructionError(404, what);

/** MariaDB's duplicate-key error, as drizzle wraps it. */
export function isDuplicateKey(err: unknown): boolean {
	const e = err as { code?: string; errno?: number; cause?: { code?: string; errno?: number } };
	return (
		e?.code === 'ER_DUP_ENTRY' ||
		e?.errno === 1062 ||
		e?.cause?.code === 'ER_DUP_ENTRY' ||
		e?.cause?.errno === 1062
	);
}
