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
