/* eslint-disable @typescript-eslint/no-explicit-any -- field names of a Refusal are known only at run time */
// Turning a Refusal from a domain function into a superforms answer that keeps the input.
import { fail } from '@sveltejs/kit';
import {
	message,
	setError,
	superValidate,
	type SuperValidated,
	type SuperValidateOptions
} from 'sveltekit-superforms';
import type { ValidationAdapter } from 'sveltekit-superforms/adapters';
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

/**
 * Like refuseForm, for pages that show refusals as the form's own error (`$errors._errors`) and
 * keep the message for success: a Refusal becomes errors on its fields, or on the whole form.
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

/**
 * The posted form, or null when the body is over BODY_SIZE_LIMIT and cannot be read: adapter-node's
 * reader fails with a 413 (directly or as the cause of the body stream's error). The caller answers
 * 413 where the user will see it (a field, the page); any other failure is thrown on.
 */
export async function postedFormData(request: Request): Promise<FormData | null> {
	try {
		return await request.formData();
	} catch (err) {
		if (isBodyTooLarge(err)) return null;
		throw err;
	}
}

/** Whether a failure to read a body is adapter-node's 413 for a body over BODY_SIZE_LIMIT. */
export function isBodyTooLarge(err: unknown): boolean {
	const e = err as { status?: number; cause?: { status?: number } } | null;
	return e?.status === 413 || e?.cause?.status === 413;
}

// Plain decimal digits, as a number input sends them ("10", "-3", "80.5").
const PLAIN_NUMBER = /^\s*-?\d+(\.\d+)?\s*$/;

/**
 * superValidate for a posted form that refuses numbers read loosely. superforms parses integer
 * fields with parseInt, so "1e309" would be stored as 1 and "10 years" as 10; a number field whose
 * posted text is not plain digits gets an error on that field instead.
 */
export async function superValidatePosted<
	Out extends Record<string, unknown>,
	M = any,
	In extends Record<string, unknown> = Out
>(
	request: Request | FormData,
	adapter: ValidationAdapter<Out, In>,
	options?: SuperValidateOptions<Out>
): Promise<SuperValidated<Out, M, In>> {
	const data = request instanceof FormData ? request : await request.formData();
	const form = await superValidate<Out, M, In>(data, adapter, options);
	for (const [key, value] of Object.entries(form.data)) {
		if (typeof value !== 'number') continue;
		const raw = data.get(key);
		// parseInt("1.5") is 1: the number kept must be the number typed.
		if (
			typeof raw === 'string' &&
			raw.trim() !== '' &&
			(!PLAIN_NUMBER.test(raw) || Number(raw) !== value || Object.is(value, -0))
		) {
			setError(form as any, key as any, 'Enter the number in plain digits, like 10.');
		}
	}
	return form;
}
