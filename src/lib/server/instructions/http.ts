import { error, json } from '@sveltejs/kit';
import { InstructionError } from './errors';

/** For JSON endpoints: a refusal becomes `{ error, fields?, ... }` with its status; anything else throws. */
export function apiRefusal(err: unknown): Response {
	if (err instanceof InstructionError) {
		return json({ error: err.message, fields: err.fields, ...err.detail }, { status: err.status });
	}
	throw err;
}

/** For page loads: a refusal becomes SvelteKit's error page with the right status. */
export function pageRefusal(err: unknown): never {
	if (err instanceof InstructionError) error(err.status, { message: err.message });
	throw err;
}
