import { z } from 'zod';

const code = (what: string, max: number) =>
	z
		.string()
		.trim()
		.max(max, `A ${what} code has at most ${max} characters.`)
		.regex(/^[A-Za-z0-9-]+$/, `A ${what} code has letters, digits and dashes only.`);

/** The Readiness board's query string: `?line=L1&shift=A&process=COG-MB,FOG-PB&agency=1`. */
export const readinessQuerySchema = z.object({
	line: code('line', 16).optional(),
	shift: code('shift', 16).optional(),
	process: z.array(code('process', 32)).max(50, 'Pick at most 50 processes.').default([]),
	agency: z
		.enum(['1', '0', 'true', 'false'], { message: 'agency is 1 or 0.' })
		.optional()
		.transform((v) => v === '1' || v === 'true'),
	format: z.enum(['json', 'csv'], { message: 'format is json or csv.' }).default('json')
});
export type ReadinessQuery = z.infer<typeof readinessQuerySchema>;

/** The schema's input from a URL: empty values count as absent; process may be repeated or comma-separated. */
export function readinessQueryInput(params: URLSearchParams) {
	const one = (k: string) => params.get(k)?.trim() || undefined;
	return {
		line: one('line'),
		shift: one('shift'),
		process: params
			.getAll('process')
			.flatMap((p) => p.split(','))
			.map((p) => p.trim())
			.filter(Boolean),
		agency: one('agency'),
		format: one('format')
	};
}
