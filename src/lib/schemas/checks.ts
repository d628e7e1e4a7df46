import { z } from 'zod';
import { QUESTION_KINDS } from '../training/vocabulary';

// eslint-disable-next-line no-control-regex
const CONTROL = /[\u0000-\u0008\u000b\u000c\u000e-\u001f]/;

const text = (max: number, what: string) =>
	z
		.string()
		.trim()
		.min(1, `${what} is required.`)
		.max(max, `${what} may be at most ${max} characters.`)
		.refine((s) => !CONTROL.test(s), `${what} contains control characters.`);

/** Check codes like KC-COG-MB: KC- and one to three dash-separated parts. */
export const CHECK_CODE_RE = /^KC(?:-[A-Z0-9]{1,8}){1,3}$/;

export const newCheckSchema = z.object({
	code: z
		.string()
		.trim()
		.toUpperCase()
		.regex(CHECK_CODE_RE, 'Use a code like KC-COG-MB (KC-, capital letters, digits and dashes).'),
	title: text(300, 'Title'),
	processId: z.coerce.number('Choose the process.').int().positive('Choose the process.')
});
export type NewCheck = z.output<typeof newCheckSchema>;

const optionalInt = (min: number, max: number, what: string) =>
	z.preprocess(
		(v) => (v === '' || v === undefined ? null : v),
		z.coerce
			.number(`${what} must be a whole number.`)
			.int(`${what} must be a whole number.`)
			.min(min, `${what} must be at least ${min}.`)
			.max(max, `${what} may be at most ${max}.`)
			.nullable()
	);

export const versionSettingsSchema = z.object({
	questionsPerAttempt: z.coerce
		.number('Give the number of questions per attempt.')
		.int('Questions per attempt must be a whole number.')
		.min(1, 'At least one question per attempt.')
		.max(50, 'At most 50 questions per attempt.'),
	timeLimitMin: optionalInt(1, 240, 'The time limit'),
	attemptsBeforeCooldown: z.coerce
		.number('Give the attempts before the cool-down.')
		.int('Attempts before the cool-down must be a whole number.')
		.min(1, 'At least 1 attempt before the cool-down.')
		.max(20, 'At most 20 attempts before the cool-down.'),
	cooldownMin: z.coerce
		.number('Give the cool-down in minutes.')
		.int('The cool-down must be a whole number of minutes.')
		.min(0, 'The cool-down cannot be negative.')
		.max(43_200, 'The cool-down may be at most 43,200 minutes (30 days).'),
	revisionId: z.preprocess(
		(v) => (v === '' || v === undefined ? null : v),
		z.coerce.number().int().positive().nullable()
	)
});
export type VersionSettings = z.output<typeof versionSettingsSchema>;

/** Up to this many choices per single or multiple-choice question. */
export const MAX_CHOICES = 6;

/**
 * The question editor as a plain form (works without JavaScript): every kind's fields are in the
 * one schema and `buildQuestion` keeps the ones that belong to the chosen kind.
 */
export const questionFormSchema = z.object({
	kind: z.enum(QUESTION_KINDS, 'Choose the kind of question.'),
	prompt: text(2000, 'The question'),
	explanation: z
		.string()
		.trim()
		.max(2000, 'The explanation may be at most 2000 characters.')
		.default(''),
	points: z.coerce
		.number('Points must be a whole number.')
		.int('Points must be a whole number.')
		.min(1, 'At least 1 point.')
		.max(10, 'At most 10 points.')
		.default(1),
	choices: z
		.array(z.string().trim().max(500, 'A choice may be at most 500 characters.'))
		.max(MAX_CHOICES)
		.default([]),
	correct: z.array(z.string().max(4)).max(MAX_CHOICES).default([]),
	trueFalse: z.enum(['', 'true', 'false']).default(''),
	value: z.string().trim().max(40).default(''),
	unit: z.string().trim().max(20, 'The unit may be at most 20 characters.').default(''),
	tolerance: z.string().trim().max(40).default(''),
	toleranceKind: z.enum(['abs', 'pct']).default('pct'),
	calculatorId: z.string().trim().max(40).default(''),
	output: z.string().trim().max(40).default(''),
	tolerancePct: z.string().trim().max(40).default(''),
	params: z.string().max(4000, 'At most 4000 characters of parameters.').default('')
});
export type QuestionForm = z.output<typeof questionFormSchema>;

export const approveSchema = z.object({
	password: z.string().min(1, 'Re-enter your password to sign.').max(200),
	comment: z.string().trim().max(2000).default('')
});

export const returnSchema = z.object({
	comment: text(2000, 'A comment for the author')
});

export const startSchema = z.object({
	processId: z.coerce.number().int().positive()
});

/** Answers as posted: `q1`, `q2`, … each one or more values (checkboxes repeat the name). */
export const answersSchema = z.record(
	z.string().regex(/^q[1-9][0-9]{0,2}$/),
	z.array(z.string().max(100, 'An answer may be at most 100 characters.')).max(12)
);

/** Answers of a JSON submission: `{ answers: { "1": "b", "2": ["a","c"], "3": "127.8" } }`. */
export const answersJsonSchema = z.object({
	answers: z
		.record(
			z.string().regex(/^[1-9][0-9]{0,2}$/),
			z.union([z.string().max(100), z.number(), z.array(z.string().max(100)).max(12)])
		)
		.default({})
});

/** Reads a posted answer form into responses by position, or null when it is malformed. */
export function answersFromForm(data: FormData): Record<number, string | string[]> | null {
	const grouped: Record<string, string[]> = {};
	for (const [name, value] of data.entries()) {
		if (!/^q\d+$/.test(name)) continue;
		(grouped[name] ??= []).push(typeof value === 'string' ? value : '');
	}
	const parsed = answersSchema.safeParse(grouped);
	if (!parsed.success) return null;
	const out: Record<number, string | string[]> = {};
	for (const [name, values] of Object.entries(parsed.data)) {
		const list = values.filter((v) => v !== '');
		out[Number(name.slice(1))] = list.length > 1 ? list : (list[0] ?? '');
	}
	return out;
}
