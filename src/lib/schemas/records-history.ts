import { z } from 'zod';

/** The training-history list's filter (GET, so a search can be bookmarked and shared). */
export const recordPeopleFilterSchema = z.object({
	q: z.string().trim().max(100, 'At most 100 characters').default(''),
	line: z
		.string()
		.trim()
		.regex(/^(|[A-Za-z0-9-]{1,16})$/, 'Choose a line from the list')
		.default(''),
	status: z
		.enum(['', 'active', 'inactive'], { message: 'Choose active, inactive or everyone' })
		.default('')
});

export type RecordPeopleFilterInput = z.infer<typeof recordPeopleFilterSchema>;
