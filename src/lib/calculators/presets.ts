// The body of a ```calc <id>``` block in an instruction: one `key: value` line per preset input.

const KEY = /^[A-Za-z][A-Za-z0-9]*(?:\.[0-9]+\.[A-Za-z][A-Za-z0-9]*)?$/;

/**
 * Reads the `key: value` lines of a calculator block. Blank lines and lines starting with `#` are
 * skipped, the value is everything after the first colon (so JSON lists keep theirs), and a key
 * given twice keeps its last value. Lines that are not `key: value` are left out; the calculator
 * reports keys it does not know.
 */
export function parseCalcPresets(body: string): Record<string, string> {
	const presets: Record<string, string> = {};
	for (const rawLine of body.split(/\r\n|\r|\n/)) {
		const line = rawLine.trim();
		if (line === '' || line.startsWith('#')) continue;
		const colon = line.indexOf(':');
		if (colon <= 0) continue;
		const key = line.slice(0, colon).trim();
		if (!KEY.test(key)) continue;
		let value = line.slice(colon + 1).trim();
		// Quoted values are allowed for text that would otherwise be trimmed or read as a comment.
		if (value.length >= 2 && /^(["']).*\1$/.test(value)) value = value.slice(1, -1);
		presets[key] = value;
	}
	return presets;
}

/**
 * The fenced block an instruction embeds for these inputs: ```calc <id>, then one `key: value`
 * line per input that differs from its default (list rows as `list.N.field`).
 */
export function calcBlockFromQuery(id: string, params: URLSearchParams): string {
	const lines = [...params.entries()]
		.filter(([key]) => !key.startsWith('_'))
		.map(([key, value]) => `${key}: ${value}`);
	return ['```calc ' + id, ...lines, '```'].join('\n');
}

/** The body of a fenced calc block (the lines between the fences). */
export function calcBlockBody(block: string): string {
	return block.split('\n').slice(1, -1).join('\n');
}
