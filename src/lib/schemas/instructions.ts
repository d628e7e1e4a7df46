import { z } from 'zod';
import { CHANGE_CLASSES, DOC_NUMBER_RE, SIGNATURE_MEANINGS } from '../instructions/vocabulary';

const MAX_SOURCE = 400_000;
// Control characters other than tab and newlines have no place in a title or a change record.
// eslint-disable-next-line no-control-regex
const CONTROL = /[\u0000-\u0008\u000b\u000c\u000e-\u001f]/;

const line = (max: number, what: string) =>
	z
		.string()
		.trim()
		.min(1, `${what} is required.`)
		.max(max, `${what} may be at most ${max} characters.`)
		.refine((s) => !CONTROL.test(s), `${what} contains control characters.`);

export const newInstructionSchema = z.object({
	docNumber: z
		.string()
		.trim()
		.toUpperCase()
		.regex(DOC_NUMBER_RE, 'Use a number like WI-COG-004 (capital letters, digits and dashes).'),
	title: line(300, 'Title'),
	processId: z.coerce.number().int().positive().nullable().default(null),
	stationIds: z.array(z.coerce.number().int().positive()).max(50).default([]),
	reviewDueOn: z.iso.date('Use a date like 2027-06-30.').nullable().default(null)
});

export const submitSchema = z.object({
	version: z.coerce.number().int().positive(),
	changeSummary: line(2000, 'The change summary'),
	reason: line(2000, 'The reason'),
	classification: z.enum(CHANGE_CLASSES, 'Choose what the change asks of operators.')
});

export const signSchema = z.object({
	meaning: z.enum(SIGNATURE_MEANINGS, 'Choose the meaning of your signature.'),
	password: z.string().min(1, 'Re-enter your password to sign.').max(200),
	effectiveDate: z.union([z.iso.date('Use a date like 2026-12-24.'), z.literal('')]).default(''),
	effectiveTime: z
		.union([z.string().regex(/^([01]\d|2[0-3]):[0-5]\d$/, 'Use a time like 06:00.'), z.literal('')])
		.default(''),
	comment: z.string().max(4000).default('')
});

export const rejectSchema = z.object({
	comment: line(4000, 'A comment for the author')
});

export const commentSchema = rejectSchema;

// NUL and unpaired UTF-16 surrogates (possible in JSON as "\ud800") cannot be stored as sent:
// the database or the encoder would change them, so the text is refused instead.
// eslint-disable-next-line no-control-regex
const UNSTORABLE = /[\u0000\p{Cs}]/u;

const sourceText = z
	.string()
	.max(MAX_SOURCE, `The text may be at most ${MAX_SOURCE} characters.`)
	.refine(
		(s) => !UNSTORABLE.test(s),
		'The text contains a NUL character or a broken character (an unpaired surrogate).'
	);

/** A JSON body carrying a whole instruction text: up to 4 bytes a character, and some room. */
export const DRAFT_BODY_MAX_BYTES = MAX_SOURCE * 4 + 64 * 1024;

export const draftSaveSchema = z.object({
	source: sourceText,
	version: z.number().int().positive()
});

export const previewSchema = z.object({
	source: sourceText,
	docNumber: z.string().regex(DOC_NUMBER_RE).optional(),
	letter: z
		.string()
		.regex(/^[A-Z]{1,2}$/)
		.optional()
});

export const withdrawSchema = z.object({ reason: line(2000, 'The reason') });
