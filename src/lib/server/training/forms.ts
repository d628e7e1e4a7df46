import { fail } from '@sveltejs/kit';
import { setError, type SuperValidated } from 'sveltekit-superforms';
import { Refusal } from '../errors';

/**
 * A Refusal becomes errors on its fields (or on the whole form) with its status, and the form
 * goes back with everything typed; anything else is unexpected and rethrown.
 */
export function refusalToForm<T extends Record<string, unknown>>(
	form: SuperValidated<T>,
	err: unknown
) {
	if (!(err instanceof Refusal)) throw err;
	const status = err.status;
	const fields = Object.entries(err.fields ?? {});
	if (!fields.length) return setError(form, '', err.message, { status });
	for (const [field, msg] of fields) {
		// superforms keeps an array's own errors under `_errors`.
		const path = Array.isArray(form.data[field]) ? `${field}._errors` : field;
		setError(form, path as never, msg, { status });
	}
	return fail(status, { form });
}
