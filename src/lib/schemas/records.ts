import { z } from 'zod';
import { RECORD_STATES } from '../records/training-records';

const optionalDate = z.union([z.literal(''), z.iso.date('Use a date (YYYY-MM-DD)')]).default('');

const optionalCode = (what: string, max: number) =>
	z
		.string()
		.trim()
		.max(max, `A ${what} code has at most ${max} characters`)
		.regex(/^[A-Za-z0-9-]*$/, `A ${what} code has letters, digits and dashes only`)
		.default('');

/**
 * The training-record filter: the Records page's GET form and the query string of both export
 * URLs (`/records/export.csv?from=…&line=L1`), so a download carries exactly what the page showed.
 */
export const recordsFilterSchema = z
	.object({
		/** Plant dates (the user's site zone), both ends included. */
		from: optionalDate,
		to: optionalDate,
		line: optionalCode('line', 16),
		process: optionalCode('process', 32),
		/** An employee number, or a person's id. */
		person: z
			.string()
			.trim()
			.max(32, 'At most 32 characters')
			.regex(/^[\p{L}\p{N}._/-]*$/u, 'An employee number or a person id')
			.default(''),
		state: z
			.union([z.literal(''), z.enum(RECORD_STATES, 'Choose a state from the list')])
			.default('')
	})
	.refine((f) => !f.from || !f.to || f.from <= f.to, {
		path: ['to'],
		message: 'The end date is before the start date'
	});

export type RecordsFilterInput = z.infer<typeof recordsFilterSchema>;
