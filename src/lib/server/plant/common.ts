import { asc, eq } from 'drizzle-orm';
import { db } from '../db';
import { lines, processes, shifts, sites, stations } from '../db/schema';
import { recordAudit, type Actor } from '../audit';
import { changedValues } from '../audit/diff';
import { ConflictError } from '../people';

export { ConflictError };

/** A value the database would take but the plant's rules do not, reported on one form field. */
export class PlantRuleError extends Error {
	constructor(
		public field: string,
		message: string
	) {
		super(message);
	}
}

function isDuplicateEntry(err: unknown): boolean {
	for (let e = err as { code?: string; errno?: number; cause?: unknown } | undefined; e;) {
		if (e.code === 'ER_DUP_ENTRY' || e.errno === 1062) return true;
		e = e.cause as typeof e;
	}
	return false;
}

/** Runs a write; the unique key on `code` turns into a ConflictError on the code field. */
export async function uniqueCode<T>(write: () => Promise<T>, message: string): Promise<T> {
	try {
		return await write();
	} catch (err) {
		if (isDuplicateEntry(err)) throw new ConflictError('code', message);
		throw err;
	}
}

/**
 * The site an admin works in: their own, or the first site when the account has none (the
 * bootstrap admin). Lines and shifts belong to a site; processes are shared by all sites.
 */
export async function resolveSiteId(siteId: number | null): Promise<number> {
	if (siteId) return siteId;
	const [s] = await db.select({ id: sites.id }).from(sites).orderBy(asc(sites.id)).limit(1);
	if (!s) throw new Error('no site configured yet: load the plant data first');
	return s.id;
}

const TABLES = { line: lines, shift: shifts, process: processes, station: stations } as const;
export type PlantKind = keyof typeof TABLES;
export type Deactivatable = Exclude<PlantKind, 'shift'>;

// The four tables share `id` and `code` (and all but shifts `active`); drizzle cannot type a
// query over a union of tables, so the generic writers below view each one through `lines`.
const tableOf = (kind: PlantKind) => TABLES[kind] as unknown as typeof lines;
type Row = typeof lines.$inferInsert;

/** Inserts one row and its audit event in one transaction; a taken code is a ConflictError. */
export async function createAudited(
	actor: Actor,
	kind: PlantKind,
	values: Record<string, unknown>,
	duplicate: string
): Promise<number> {
	const t = tableOf(kind);
	return uniqueCode(
		() =>
			db.transaction(async (tx) => {
				const [{ id }] = await tx
					.insert(t)
					.values(values as unknown as Row)
					.$returningId();
				await recordAudit(tx, actor, {
					action: `${kind}.create`,
					entityType: kind,
					entityId: id,
					newValues: kind === 'shift' ? values : { ...values, active: true }
				});
				return id;
			}),
		duplicate
	);
}

/**
 * Saves changed fields with their old and new values in the audit trail, in one transaction.
 * An unchanged save writes nothing. Returns whether anything changed.
 */
export async function updateAudited(
	actor: Actor,
	kind: PlantKind,
	id: number,
	next: Record<string, unknown>,
	duplicate: string
): Promise<boolean> {
	const t = tableOf(kind);
	return uniqueCode(
		() =>
			db.transaction(async (tx) => {
				const [old] = await tx.select().from(t).where(eq(t.id, id)).for('update');
				if (!old) throw new Error(`${kind} ${id} vanished`);
				const diff = changedValues(old as Record<string, unknown>, next);
				if (!diff.changed) return false;
				await tx
					.update(t)
					.set(next as Partial<Row>)
					.where(eq(t.id, id));
				await recordAudit(tx, actor, {
					action: `${kind}.update`,
					entityType: kind,
					entityId: id,
					oldValues: { code: old.code, ...diff.before },
					newValues: { code: next.code ?? old.code, ...diff.after }
				});
				return true;
			}),
		duplicate
	);
}

/**
 * Deactivates or reactivates a line, process or station. Nothing is deleted: certificates, gate
 * checks and the audit trail keep pointing at the row.
 */
export async function setPlantActive(
	actor: Actor,
	kind: Deactivatable,
	id: number,
	active: boolean,
	reason: string
) {
	const t = tableOf(kind);
	await db.transaction(async (tx) => {
		const [old] = await tx
			.select({ active: t.active, code: t.code })
			.from(t)
			.where(eq(t.id, id))
			.for('update');
		if (!old) throw new Error(`${kind} ${id} vanished`);
		if (old.active === active) return;
		await tx.update(t).set({ active }).where(eq(t.id, id));
		await recordAudit(tx, actor, {
			action: `${kind}.${active ? 'reactivate' : 'deactivate'}`,
			entityType: kind,
			entityId: id,
			oldValues: { code: old.code, active: old.active },
			newValues: { code: old.code, active },
			reason
		});
	});
}
