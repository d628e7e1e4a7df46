import { z } from 'zod';

export const API_KEY_SCOPE_CHOICES = [
	{ value: 'calculators', label: 'Calculators API', hint: 'POST /api/v1/calculators/<id>' },
	{ value: 'gate', label: 'Station gate', hint: 'The allow/deny check of a station' }
] as const;

const NO_CONTROL = /^[^\p{Cc}\u202A-\u202E\u2066-\u2069]*$/u;

const optionalId = z
	.union([z.literal(''), z.coerce.number().int().positive()])
	.transform((v) => (v === '' ? null : v))
	.nullable()
	.default(null);

export const createApiKeySchema = z.object({
	name: z
		.string()
		.trim()
		.min(3, 'Give the key a name of at least 3 characters (what uses it, where)')
		.max(200, 'At most 200 characters')
		.regex(NO_CONTROL, 'The name contains control characters'),
	scope: z.enum(['calculators', 'gate'], { error: 'Choose what the key may call' }),
	stationId: optionalId
});

export const revokeApiKeySchema = z.object({
	id: z.coerce.number().int().positive(),
	reason: z
		.string()
		.trim()
		.min(3, 'Say why the key is revoked (at least 3 characters)')
		.max(500, 'At most 500 characters')
});

export const rotateApiKeySchema = z.object({
	id: z.coerce.number().int().positive(),
	reason: z.string().trim().max(500, 'At most 500 characters').default('')
});

export type CreateApiKeyInput = z.output<typeof createApiKeySchema>;
