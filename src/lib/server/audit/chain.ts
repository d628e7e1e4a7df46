import { createHash } from 'node:crypto';

export const GENESIS_HASH = '0'.repeat(64);

/** Stable JSON: keys sorted, Dates as ISO strings, so a value hashes the same after a round trip. */
export function canonicalJson(value: unknown): string {
	const norm = (v: unknown): unknown => {
		if (v === undefined) return null;
		if (v instanceof Date) return v.toISOString();
		if (Array.isArray(v)) return v.map(norm);
		if (v && typeof v === 'object') {
			return Object.fromEntries(
				Object.keys(v as Record<string, unknown>)
					.sort()
					.filter((k) => (v as Record<string, unknown>)[k] !== undefined)
					.map((k) => [k, norm((v as Record<string, unknown>)[k])])
			);
		}
		return v;
	};
	return JSON.stringify(norm(value));
}

export interface ChainedFields {
	seq: number;
	at: Date;
	actorId: number | null;
	actorLabel: string;
	action: string;
	entityType: string;
	entityId: string | null;
	oldValues: unknown;
	newValues: unknown;
	reason: string | null;
	address: string | null;
}

/** The hash of one audit row: its content and the previous row's hash. */
export function auditRowHash(prevHash: string, f: ChainedFields): string {
	const body = canonicalJson([
		prevHash,
		f.seq,
		f.at.toISOString(),
		f.actorId,
		f.actorLabel,
		f.action,
		f.entityType,
		f.entityId,
		f.oldValues ?? null,
		f.newValues ?? null,
		f.reason,
		f.address
	]);
	return createHash('sha256').update(body).digest('hex');
}
