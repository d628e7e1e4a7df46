import { error, json } from '@sveltejs/kit';

/** A refusal the user should see: HTTP status, a clear message and optional field errors. */
export class Refusal extends Error {
	constructor(
		public status: 400 | 401 | 403 | 404 | 409 | 413 | 415 | 422 | 429,
		message: string,
		public fields?: Record<string, string>,
		public detail?: Record<string, unknown>
	) {
		super(message);
	}
}

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

/** For JSON endpoints: a refusal becomes `{ error, fields?, ... }` with its status; anything else throws. */
export function apiRefusal(err: unknown): Response {
	if (err instanceof Refusal) {
		return json({ error: err.message, fields: err.fields, ...err.detail }, { status: err.status });
	}
	throw err;
}

/** For page loads: a refusal becomes SvelteKit's error page with the right status. */
export function pageRefusal(err: unknown): never {
	if (err instanceof Refusal) error(err.status, { message: err.message });
	throw err;
}
