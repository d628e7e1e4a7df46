// How audit events read on screen and in exports (no server imports: pages use it too).

import { formatLocal } from './time';

/** "2026-05-14 09:12:33" in the given zone, to the second, as auditors compare instants. */
export const formatInstant = (at: Date | string, timeZone: string) =>
	formatLocal(at, timeZone, false, true);

const isRecord = (v: unknown): v is Record<string, unknown> =>
	typeof v === 'object' && v !== null && !Array.isArray(v);

/** A readable value: lists joined, objects as compact JSON, nothing as an em dash. */
export function formatValue(v: unknown): string {
	if (v === null || v === undefined || v === '') return '—';
	if (Array.isArray(v)) return v.length ? v.map((x) => formatValue(x)).join(', ') : '(none)';
	if (isRecord(v)) return JSON.stringify(v);
	if (typeof v === 'boolean') return v ? 'yes' : 'no';
	return String(v);
}

export interface ValueChange {
	field: string;
	before: string;
	after: string;
	changed: boolean;
}

/** Old and new values side by side, field by field, in a stable order. */
export function valueChanges(oldValues: unknown, newValues: unknown): ValueChange[] {
	const o = isRecord(oldValues) ? oldValues : {};
	const n = isRecord(newValues) ? newValues : {};
	const fields = [...new Set([...Object.keys(o), ...Object.keys(n)])].sort();
	return fields.map((field) => {
		const before = field in o ? formatValue(o[field]) : '—';
		const after = field in n ? formatValue(n[field]) : '—';
		return { field, before, after, changed: before !== after };
	});
}

/** A short name for the entity an event is about, taken from its values (code, name, e-mail). */
export function entityLabel(oldValues: unknown, newValues: unknown): string | null {
	for (const v of [newValues, oldValues]) {
		if (!isRecord(v)) continue;
		for (const k of ['code', 'employeeNo', 'displayName', 'email', 'name']) {
			if (typeof v[k] === 'string' && v[k]) return v[k] as string;
		}
	}
	return null;
}
