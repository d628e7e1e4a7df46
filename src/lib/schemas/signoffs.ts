import { z } from 'zod';

// eslint-disable-next-line no-control-regex
const CONTROL = /[\u0000-\u0008\u000b\u000c\u000e-\u001f]/;

const text = (max: number, what: string) =>
	z
		.string()
		.trim()
		.max(max, `${what} may be at most ${max} characters.`)
		.refine((s) => !CONTROL.test(s), `${what} contains control characters.`);

export const CHECKLIST_MAX_ITEMS = 30;
export const CHECKLIST_ITEM_MAX = 500;

/** The observable steps, one per line of the textarea; blank lines are dropped. */
export function splitChecklistItems(raw: string): string[] {
	return raw
		.split(/\r?\n/)
		.map((s) => s.trim())
		.filter(Boolean);
}

export const checklistSchema = z.object({
	title: text(300, 'Title').min(1, 'Give the checklist a title.'),
	revisionId: z.coerce
		.number('Choose the instruction revision the checklist is tied to.')
		.int()
		.positive('Choose the instruction revision the checklist is tied to.'),
	items: z
		.string()
		.max(20_000, 'The list is too long.')
		.refine((s) => !CONTROL.test(s), 'The list contains control characters.')
		.refine((s) => splitChecklistItems(s).length > 0, 'List at least one observable step.')
		.refine(
			(s) => splitChecklistItems(s).length <= CHECKLIST_MAX_ITEMS,
			`At most ${CHECKLIST_MAX_ITEMS} steps per checklist.`
		)
		.refine(
			(s) => splitChecklistItems(s).every((i) => i.length <= CHECKLIST_ITEM_MAX),
			`Each step may be at most ${CHECKLIST_ITEM_MAX} characters.`
		)
});

export const retireSchema = z.object({
	reason: text(500, 'The reason').min(1, 'Say why the checklist is retired.')
});

export const startSignoffSchema = z.object({
	personId: z.coerce
		.number('Choose the operator being observed.')
		.int()
		.positive('Choose the operator being observed.'),
	checklistId: z.coerce.number('Choose a checklist.').int().positive('Choose a checklist.'),
	stationId: z.coerce.number().int().positive().nullable().default(null)
});

export const personSearchSchema = z.object({
	q: text(100, 'The search').default('')
});

export const signoffItemSchema = z.object({
	itemId: z.coerce.number().int().positive(),
	result: z.enum(['pass', 'fail'], 'Mark the step as pass or fail.'),
	comment: text(1000, 'The comment').default(''),
	photo: z.instanceof(File).optional()
});

export const trainerSignSchema = z.object({
	password: z.string().min(1, 'Re-enter your password to sign.').max(200)
});

export const countersignSchema = z.object({
	password: z.string().min(1, 'Enter your PIN or password to countersign.').max(200)
});

export const certificateStateSchema = z.object({
	reason: text(2000, 'The reason').min(1, 'Give the reason; it is kept in the audit trail.')
});

export const certificateFilterSchema = z.object({
	q: text(100, 'The search').default(''),
	processId: z.coerce.number().int().positive().optional().catch(undefined),
	status: z
		.enum([
			'valid',
			'expiring',
			'retraining_due',
			'retraining_overdue',
			'expired',
			'suspended',
			'withdrawn',
			'superseded'
		])
		.optional()
		.catch(undefined)
});
