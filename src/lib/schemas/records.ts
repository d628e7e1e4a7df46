import { z } from 'zod';
import { RETENTION_YEAR_BOUNDS } from '../records/retention';

const reason = (what: string) =>
	z
		.string(`Say ${what}.`)
		.trim()
		.min(3, `Say ${what} (at least 3 characters).`)
		.max(500, 'Keep it under 500 characters.');

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
