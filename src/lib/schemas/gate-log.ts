import { z } from 'zod';

const optionalDate = z.union([z.literal(''), z.iso.date('Use a date (YYYY-MM-DD)')]).default('');
const optionalCode = (what: string) =>
	z
		.string()
		.trim()
		.regex(/^(|[A-Za-z0-9-]{1,32})$/, `Choose a ${what} from the list`)
		.default('');

/**
 * The gate log's filter: a period in plant dates, station, line, a person (badge as scanned,
 * employee number or name) and the decision. GET, so the export link carries the same filter.
 */
export const gateLogFilterSchema = z
	.object({
		from: optionalDate,
		to: optionalDate,
		station: optionalCode('station'),
		line: optionalCode('line'),
		person: z.string().trim().max(100, 'At most 100 characters').default(''),
		decision: z.enum(['', 'allow', 'deny'], { message: 'Choose allow, deny or any' }).default(''),
		page: z.coerce.number().int().min(1).max(1_000_000).catch(1).default(1)
	})
	.refine((f) => !f.from || !f.to || f.from <= f.to, {
		path: ['to'],
		message: 'The end date is before the start date'
	});

export type GateLogFilterInput = z.infer<typeof gateLogFilterSchema>;
