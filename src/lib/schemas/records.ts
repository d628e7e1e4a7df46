import { z } from 'zod';
import { RETENTION_YEAR_BOUNDS } from '../records/retention';
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

// Control characters other than tab and newlines (NUL above all) have no place in a reason.
// eslint-disable-next-line no-control-regex
const CONTROL = /[\u0000-\u0008\u000b\u000c\u000e-\u001f\u007f]/;

const reason = (what: string) =>
	z
		.string(`Say ${what}.`)
		.trim()
		.min(3, `Say ${what} (at least 3 characters).`)
		.max(500, 'Keep it under 500 characters.')
		.refine((s) => !CONTROL.test(s), 'The text contains control characters.');

const years = (type: keyof typeof RETENTION_YEAR_BOUNDS) => {
	const { min, max } = RETENTION_YEAR_BOUNDS[type];
	const msg = `A whole number of years from ${min} to ${max}.`;
	return z.coerce.number(msg).int(msg).min(min, msg).max(max, msg);
};

/** The admin's retention rules form: both periods and why they change. */
export const retentionRulesSchema = z.object({
	trainingRecordsYears: years('training_records'),
	gateLogYears: years('gate_log'),
	reason: reason('why the periods change')
});

/** Placing a legal hold: the person by employee number, and the reason. */
export const placeHoldSchema = z.object({
	employeeNo: z
		.string('Give the employee number.')
		.trim()
		.min(1, 'Give the employee number.')
		.max(32, 'An employee number has at most 32 characters.'),
	reason: reason('why the records must be kept')
});

export const releaseHoldSchema = z.object({
	holdId: z.coerce.number('Choose the hold.').int('Choose the hold.').positive('Choose the hold.'),
	reason: reason('why the hold ends')
});

/** A real retention run: confirmed, and the person's own password again. */
export const retentionRunSchema = z.object({
	confirm: z
		.boolean()
		.default(false)
		.refine((v) => v, 'Tick the box to confirm that the listed records change for good.'),
	password: z.string('Enter your password.').min(1, 'Enter your password.').max(256)
});

/** The dry run has no input; the schema keeps its form in superforms like the others. */
export const retentionDryRunSchema = z.object({});
