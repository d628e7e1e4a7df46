import { canonicalJson } from './chain';

/**
 * The fields of `next` whose values differ from `old`, as the before/after pair an audit event
 * records. Arrays and objects compare by content, so re-saving the same list is no change.
 */
export function changedValues<T extends Record<string, unknown>>(
	old: Partial<Record<keyof T, unknown>>,
	next: T
): { before: Partial<T>; after: Partial<T>; changed: boolean } {
	const before: Partial<T> = {};
	const after: Partial<T> = {};
	for (const k of Object.keys(next) as (keyof T)[]) {
		if (canonicalJson(old[k] ?? null) !== canonicalJson(next[k] ?? null)) {
			before[k] = (old[k] ?? null) as T[keyof T];
			after[k] = next[k];
		}
	}
	return { before, after, changed: Object.keys(after).length > 0 };
}
