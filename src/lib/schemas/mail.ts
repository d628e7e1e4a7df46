import { z } from 'zod';

const NO_CONTROL = /^[^\p{Cc}\u202A-\u202E\u2066-\u2069]*$/u;

export const resendMailSchema = z.object({
	id: z.coerce.number().int().positive().max(Number.MAX_SAFE_INTEGER),
	reason: z
		.string()
		.trim()
		.min(3, 'Say what was fixed, or why it is sent again (at least 3 characters)')
		.max(500, 'At most 500 characters')
		.regex(NO_CONTROL, 'The reason contains control characters')
});
