// Small pieces every JSON endpoint needs: reading a body without throwing, and zod issues as
// `{ field: message }` for the `{ error, fields }` answer.
import { json } from '@sveltejs/kit';
import type { z } from 'zod';

const MAX_JSON_BYTES = 64 * 1024;

/**
 * The request's JSON body, or a clear refusal (415 wrong type, 413 too large, 400 not JSON).
 * `maxBytes` counts UTF-8 bytes; endpoints that take a whole instruction text raise it.
 */
export async function readJson(
	request: Request,
	{ maxBytes = MAX_JSON_BYTES }: { maxBytes?: number } = {}
): Promise<{ ok: true; value: unknown } | { ok: false; status: 400 | 413 | 415; error: string }> {
	const type = request.headers.get('content-type') ?? '';
	if (!/^application\/json\b/i.test(type))
		return { ok: false, status: 415, error: 'Send the body as application/json.' };
	const tooBig = {
		ok: false,
		status: 413,
		error: `The body may be at most ${maxBytes} bytes.`
	} as const;
	if (Number(request.headers.get('content-length') ?? 0) > maxBytes) return tooBig;
	const text = await request.text().catch(() => null);
	if (text === null)
		return { ok: false, status: 400, error: 'The request body could not be read.' };
	if (Buffer.byteLength(text, 'utf8') > maxBytes) return tooBig;
	try {
		return { ok: true, value: JSON.parse(text) };
	} catch {
		return { ok: false, status: 400, error: 'The body is not valid JSON.' };
	}
}

/** The `{ error, fields }` answer to a body readJson refused (no field is to blame: `fields` is empty). */
export function bodyRefusal(refused: { status: number; error: string }): Response {
	return json({ error: refused.error, fields: {} }, { status: refused.status });
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

const strictUtf8 = new TextDecoder('utf-8', { fatal: true });

function isUtf8(bytes: Uint8Array): boolean {
	try {
		strictUtf8.decode(bytes);
		return true;
	} catch {
		return false;
	}
}

/** Every run of %XX escapes in `raw` decodes to UTF-8 (a lone `%` is left to the parser). */
function escapesAreUtf8(raw: string): boolean {
	for (const [run] of raw.matchAll(/(?:%[0-9A-Fa-f]{2})+/g)) {
		const bytes = run
			.slice(1)
			.split('%')
			.map((h) => parseInt(h, 16));
		if (!isUtf8(Uint8Array.from(bytes))) return false;
	}
	return true;
}

const partIsUtf8 = (raw: Uint8Array) =>
	isUtf8(raw) && escapesAreUtf8(Buffer.from(raw).toString('latin1'));

/**
 * For a urlencoded or JSON body: the names of the fields whose text is not UTF-8 (raw bytes or
 * percent-escapes), `['_']` when it cannot be told which, or null when the body is fine. Parsers
 * replace such bytes with U+FFFD without a word, so a name would be stored other than it was sent.
 */
export function invalidUtf8Fields(bytes: Uint8Array, type: 'form' | 'json'): string[] | null {
	if (type === 'json') return isUtf8(bytes) ? null : ['_'];
	const bad = new Set<string>();
	let start = 0;
	for (let i = 0; i <= bytes.length; i++) {
		if (i < bytes.length && bytes[i] !== 0x26) continue; // '&'
		const pair = bytes.subarray(start, i);
		start = i + 1;
		const eq = pair.indexOf(0x3d); // '='
		const rawName = eq < 0 ? pair : pair.subarray(0, eq);
		const rawValue = eq < 0 ? new Uint8Array() : pair.subarray(eq + 1);
		if (partIsUtf8(rawName) && partIsUtf8(rawValue)) continue;
		const name = partIsUtf8(rawName)
			? [...new URLSearchParams(Buffer.from(rawName).toString('utf8')).keys()][0]
			: undefined;
		bad.add(name || '_');
	}
	return bad.size ? [...bad] : null;
}
