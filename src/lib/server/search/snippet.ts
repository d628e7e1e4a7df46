// Highlighted snippets for search results: the text is HTML-escaped first, then the matched
// words are wrapped in <mark>, so nothing from an instruction can become markup.

const escapeHtml = (s: string) =>
	s.replace(
		/[&<>"']/g,
		(c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!
	);

const escapeRegExp = (s: string) => s.replace(/[.*+?^${}()|[\]\\]/g, '\\$&');

/** Query words worth highlighting (at least two characters). */
export function queryTerms(q: string): string[] {
	return [
		...new Set(
			q
				.toLocaleLowerCase()
				.split(/[^\p{L}\p{N}]+/u)
				.filter((t) => t.length >= 2)
		)
	];
}

function termPattern(terms: string[]): RegExp | null {
	if (!terms.length) return null;
	return new RegExp(`(?<![\\p{L}\\p{N}])(?:${terms.map(escapeRegExp).join('|')})`, 'giu');
}

/** Escapes `text` and marks every word that starts with a query term. */
export function markMatches(text: string, terms: string[]): string {
	const re = termPattern(terms);
	if (!re) return escapeHtml(text);
	let out = '';
	let last = 0;
	for (const m of text.matchAll(re)) {
		const start = m.index!;
		out += escapeHtml(text.slice(last, start)) + '<mark>' + escapeHtml(m[0]) + '</mark>';
		last = start + m[0].length;
	}
	return out + escapeHtml(text.slice(last));
}

/** A window of about `width` characters around the first match, escaped and marked. */
export function makeSnippet(text: string, terms: string[], width = 180): string {
	const re = termPattern(terms);
	const first = re ? re.exec(text) : null;
	const at = first?.index ?? 0;
	let start = Math.max(0, at - Math.floor(width / 3));
	let end = Math.min(text.length, start + width);
	start = Math.max(0, Math.min(start, end - width));
	// Do not cut words in half.
	if (start > 0) start = text.indexOf(' ', start) + 1 || start;
	if (end < text.length)
		end = text.lastIndexOf(' ', end) > start ? text.lastIndexOf(' ', end) : end;
	const body = markMatches(text.slice(start, end), terms);
	return `${start > 0 ? '… ' : ''}${body}${end < text.length ? ' …' : ''}`;
}
