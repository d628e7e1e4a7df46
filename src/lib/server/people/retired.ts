// Identifiers that belonged to an anonymised person. Only their SHA-256 is kept, so the value is
// gone, yet nobody can be given the same employee number, badge or e-mail address again.
import { createHash } from 'node:crypto';
import { and, eq, or } from 'drizzle-orm';
import type { DbOrTx, Tx } from '../db';
import { retiredIdentifiers } from '../db/schema';
import type { RetiredIdentifierKind } from '../../records/vocabulary';

export type Identifiers = Partial<Record<RetiredIdentifierKind, string | null | undefined>>;

/** Field of the person form for each kind. */
const FIELD: Record<RetiredIdentifierKind, 'employeeNo' | 'badgeNo' | 'email'> = {
	employee_no: 'employeeNo',
	badge_no: 'badgeNo',
	email: 'email'
};
const LABEL: Record<RetiredIdentifierKind, string> = {
	employee_no: 'employee number',
	badge_no: 'badge number',
	email: 'e-mail address'
};

/**
 * The hash kept for an identifier. Case and surrounding spaces are ignored, as the unique keys on
 * `people` ignore them (utf8mb4_unicode_ci).
 */
export function identifierSha256(value: string): string {
	return createHash('sha256').update(value.trim().toLowerCase(), 'utf8').digest('hex');
}

function present(ids: Identifiers): [RetiredIdentifierKind, string][] {
	return (Object.entries(ids) as [RetiredIdentifierKind, string | null | undefined][]).filter(
		(e): e is [RetiredIdentifierKind, string] => !!e[1]?.trim()
	);
}

/** Records the identifiers as retired (a second call for the same value changes nothing). */
export async function retireIdentifiers(tx: Tx, ids: Identifiers, at: Date): Promise<string[]> {
	const rows = present(ids).map(([kind, value]) => ({
		kind,
		valueSha256: identifierSha256(value),
		retiredAt: at
	}));
	if (rows.length) await tx.insert(retiredIdentifiers).ignore().values(rows);
	return rows.map((r) => r.kind);
}

/**
 * The first of the given identifiers that is retired, as the person form's field and a message
 * saying why it cannot be used; null when none is.
 */
export async function findRetiredIdentifier(
	conn: DbOrTx,
	ids: Identifiers
): Promise<{ field: string; message: string } | null> {
	const wanted = present(ids);
	if (!wanted.length) return null;
	const hits = await conn
		.select({ kind: retiredIdentifiers.kind })
		.from(retiredIdentifiers)
		.where(
			or(
				...wanted.map(([kind, value]) =>
					and(
						eq(retiredIdentifiers.kind, kind),
						eq(retiredIdentifiers.valueSha256, identifierSha256(value))
					)
				)
			)
		);
	const kind = wanted.find(([k]) => hits.some((h) => h.kind === k))?.[0];
	if (!kind) return null;
	return {
		field: FIELD[kind],
		message: `This ${LABEL[kind]} belonged to a person whose records were anonymised. Identifiers are never given to anyone else: choose another.`
	};
}
