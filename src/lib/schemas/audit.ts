import { z } from 'zod';

const optionalDate = z.union([z.literal(''), z.iso.date('Use a date (YYYY-MM-DD)')]).default('');

/** The audit trail's filter form (GET, so it works without JavaScript and links can be shared). */
export const auditFilterSchema = z
	.object({
		q: z.string().trim().max(200, 'At most 200 characters').default(''),
		action: z.string().trim().max(64).default(''),
		entityType: z.string().trim().max(64).default(''),
		entityId: z.string().trim().max(64).default(''),
		/** A person's id, "system" for events without a signed-in actor, or empty for everyone. */
		actor: z
			.string()
			.trim()
			.regex(/^(|system|[1-9]\d{0,15})$/, 'Choose someone from the list')
			.default(''),
		from: optionalDate,
		to: optionalDate,
		page: z.coerce.number().int().min(1).max(1_000_000).catch(1).default(1)
	})
	.refine((f) => !f.from || !f.to || f.from <= f.to, {
		path: ['to'],
		message: 'The end date is before the start date'
	});

export type AuditFilterInput = z.infer<typeof auditFilterSchema>;
