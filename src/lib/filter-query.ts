// Filters that live in the query string (GET forms), kept when paging, exporting or posting an
// action from the same page.

/** The filter of a page's URL: every set parameter except the page number and action names. */
export function filterEntries(url: URL): [string, string][] {
	return [...url.searchParams].filter(([k, v]) => k !== 'page' && !k.startsWith('/') && v !== '');
}

export function toQuery(entries: [string, string][]): string {
	return entries.map(([k, v]) => `${encodeURIComponent(k)}=${encodeURIComponent(v)}`).join('&');
}

/** `path` with the filter and `extra` parameters (which win). */
export function withQuery(
	path: string,
	entries: [string, string][],
	extra: Record<string, string> = {}
): string {
	const merged = Object.entries({ ...Object.fromEntries(entries), ...extra });
	return merged.length ? `${path}?${toQuery(merged)}` : path;
}

/** A form action on the same page that keeps the filter (`?filter&/verify`). */
export function actionWithQuery(action: string, entries: [string, string][]): string {
	return entries.length ? `?${toQuery(entries)}&/${action}` : `?/${action}`;
}
