// Small pieces every JSON endpoint needs: reading a body without throwing, and zod issues as
// `{ field: message }` for the `{ error, fields }` answer.
import type { z } from 'zod';

const MAX_JSON_BYTES = 64 * 1024;

/** The request's JSON body, or a clear refusal (415 wrong type, 413 too large, 400 not JSON). */
export async function readJson(
	request: Request
): Promise<{ ok: true; value: unknown } | { ok: false; status: 400 | 413 | 415; error: string }> {
	const type = request.headers.get('content-type') ?? '';
	if (!/^application\/json\b/i.test(type))
		return { ok: false, status: 415, error: 'Send the body as application/json.' };
	const text = await request.text().catch(() => null);
	if (text === null)
		return { ok: false, status: 400, error: 'The request body could not be read.' };
	if (text.length > MAX_JSON_BYTES)
		return { ok: false, status: 413, error: `The body may be at most ${MAX_JSON_BYTES} bytes.` };
	try {
		return { ok: true, value: JSON.parse(text) };
	} catch {
		return { ok: false, status: 400, error: 'The body is not valid JSON.' };
	}
}

/** The first message per field of a zod error (`_` for errors about the whole body). */
export function fieldErrors(error: z.ZodError): Record<string, string> {
	const out: Record<string, string> = {};
	for (const issue of error.issues) {
		const key = issue.path.length ? issue.path.join('.') : '_';
		out[key] ??= issue.message;
	}
	return out;
}
