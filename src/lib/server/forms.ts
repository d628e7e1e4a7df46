/* eslint-disable @typescript-eslint/no-explicit-any -- field names of a Refusal are known only at run time */
// Turning a Refusal from a domain function into a superforms answer that keeps the input.
import { message, setError, type SuperValidated } from 'sveltekit-superforms';
import { Refusal } from './errors';

/**
 * A Refusal with field errors becomes errors on those fields (when the form has them), otherwise
 * the form's message; anything else is rethrown for handleError.
 */
export function refuseForm<T extends Record<string, unknown>>(
	form: SuperValidated<T, any>,
	err: unknown
) {
	if (!(err instanceof Refusal)) throw err;
	const fields = Object.entries(err.fields ?? {}).filter(([k]) => k in form.data);
	if (fields.length) {
		for (const [k, v] of fields.slice(1)) setError(form, k as any, v);
		form.message = err.message;
		return setError(form, fields[0][0] as any, fields[0][1], { status: err.status });
	}
	return message(form, err.message, { status: err.status });
}
