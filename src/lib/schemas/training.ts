import { z } from 'zod';
import { ASSIGNMENT_SCOPES } from '../training/vocabulary';

// eslint-disable-next-line no-control-regex
const CONTROL = /[\u0000-\u0008\u000b\u000c\u000e-\u001f\u202A-\u202E\u2066-\u2069]/;

const whole = (label: string, min: number, max: number) =>
	z.coerce
		.number(`${label}: a whole number`)
		.int(`${label}: a whole number`)
		.min(min, `${label}: at least ${min}`)
		.max(max, `${label}: at most ${max}`);

const optionalId = z.coerce.number().int().positive().nullable().default(null);

/** The shortest span, in days, that `months` calendar months can cover (February counts 28). */
export function shortestMonthsDays(months: number): number {
	if (!Number.isFinite(months) || months < 0) return Infinity;
	const lengths = [31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31];
	// Whole years are 365 days from any start; only the remaining months depend on it. (A loop
	// over every month let one posted "99999999999999999999" hold the server for good.)
	const years = Math.floor(months / 12);
	const rest = Math.floor(months) % 12;
	let best = Infinity;
	for (let start = 0; start < 12; start++) {
		let days = 0;
		for (let i = 0; i < rest; i++) days += lengths[(start + i) % 12];
		best = Math.min(best, days);
	}
	return years * 365 + best;
}

/**
 * Reads "30, 7" as [30, 7]; returns a message instead when the list is not whole positive days,
 * strictly descending, each shorter than the validity.
 */
export function parseReminderDays(text: string, validityMonths: number): number[] | string {
	const parts = text
		.split(/[,;\s]+/)
		.map((p) => p.trim())
		.filter(Boolean);
	if (!parts.length) return 'Give at least one reminder, e.g. 30, 7';
	if (parts.length > 6) return 'At most 6 reminders';
	const days: number[] = [];
	for (const p of parts) {
		if (!/^\d{1,4}$/.test(p) || Number(p) < 1) return `"${p}" is not a whole number of days ≥ 1`;
		days.push(Number(p));
	}
	for (let i = 1; i < days.length; i++) {
		if (days[i] >= days[i - 1]) return 'List the days from the largest to the smallest, e.g. 30, 7';
	}
	const limit = Number.isInteger(validityMonths) ? shortestMonthsDays(validityMonths) : Infinity;
	if (Number.isInteger(validityMonths) && validityMonths >= 1 && days[0] >= limit) {
		return `Each reminder must come before the certificate is issued: less than ${limit} days for ${validityMonths} month${validityMonths === 1 ? '' : 's'}`;
	}
	return days;
}

export const ruleSchema = z
	.object({
		/** The version the form was opened on (0 = no rule yet); a newer one on save is a conflict. */
		previousVersion: z.coerce.number().int().min(0).default(0),
		instructionIds: z.array(z.coerce.number().int().positive()).max(20).default([]),
		checkId: optionalId,
		passMarkPct: whole('Pass mark', 1, 100).default(80),
		practicalRequired: z.boolean().default(true),
		checklistId: optionalId,
		validityMonths: whole('Validity', 1, 60).default(12),
		graceDays: whole('Grace', 0, 90).default(14),
		reminderDays: z.string().trim().max(60, 'At most 60 characters').default('30, 7'),
		showFullNameOnVerify: z.boolean().default(false),
		note: z
			.string()
			.trim()
			.max(2000, 'At most 2000 characters')
			.refine((s) => !CONTROL.test(s), 'The note contains control characters')
			.default(''),
		activeFromDate: z.union([z.iso.date('Use a date like 2026-12-24'), z.literal('')]).default(''),
		activeFromTime: z
			.union([
				z.string().regex(/^([01]\d|2[0-3]):[0-5]\d$/, 'Use a time like 06:00'),
				z.literal('')
			])
			.default('')
	})
	.superRefine((v, ctx) => {
		const reminders = parseReminderDays(v.reminderDays, v.validityMonths);
		if (typeof reminders === 'string')
			ctx.addIssue({ code: 'custom', path: ['reminderDays'], message: reminders });
		if (v.practicalRequired && !v.checklistId)
			ctx.addIssue({
				code: 'custom',
				path: ['checklistId'],
				message: 'A practical sign-off needs its checklist; choose one or set practical to No'
			});
		if (!v.instructionIds.length && !v.checkId && !v.practicalRequired)
			ctx.addIssue({
				code: 'custom',
				path: ['instructionIds'],
				message:
					'A rule with no acknowledgement, no knowledge check and no practical would certify anyone; ask for at least one'
			});
		if (v.activeFromTime && !v.activeFromDate)
			ctx.addIssue({
				code: 'custom',
				path: ['activeFromDate'],
				message: 'Give the date as well, or leave both empty for now'
			});
	});
export type RuleInput = z.infer<typeof ruleSchema>;

export const assignSchema = z
	.object({
		processId: z.coerce.number('Choose the process').int().positive('Choose the process'),
		scope: z.enum(ASSIGNMENT_SCOPES, 'Choose whom to assign'),
		personId: optionalId,
		lineId: optionalId,
		stationId: optionalId,
		dueOn: z.union([z.iso.date('Use a date like 2026-12-24'), z.literal('')]).default('')
	})
	.superRefine((v, ctx) => {
		const need = { person: 'personId', line: 'lineId', station: 'stationId' } as const;
		const field = need[v.scope];
		if (field && !v[field]) {
			const what = { person: 'person', line: 'line', station: 'station' }[v.scope];
			ctx.addIssue({ code: 'custom', path: [field], message: `Choose the ${what}` });
		}
	});
export type AssignInput = z.infer<typeof assignSchema>;

export const closeAssignmentSchema = z.object({
	assignmentId: z.coerce.number().int().positive(),
	reason: z
		.string()
		.trim()
		.min(3, 'Say why the assignment is closed (at least 3 characters)')
		.max(200, 'At most 200 characters')
		.refine((s) => !CONTROL.test(s), 'The reason contains control characters')
});

/** The list filters of /assignments, read from the query string; anything malformed is ignored. */
export const assignmentFilterSchema = z.object({
	line: z.coerce.number().int().positive().optional().catch(undefined),
	process: z.coerce.number().int().positive().optional().catch(undefined),
	overdue: z
		.string()
		.optional()
		.transform((v) => v === '1' || v === 'on')
		.catch(false)
});

export const acknowledgeSchema = z.object({
	understood: z
		.boolean()
		.default(false)
		.refine((v) => v, 'Tick the box to confirm you have read and understood this revision.'),
	secret: z
		.string()
		.min(1, 'Enter your own PIN or password to sign.')
		.max(200, 'That is too long for a PIN or password.')
});
