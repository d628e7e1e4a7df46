import { z } from 'zod';

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
