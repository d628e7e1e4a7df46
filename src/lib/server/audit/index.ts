import {
	and,
	asc,
	desc,
	eq,
	gt,
	gte,
	isNotNull,
	isNull,
	like,
	lt,
	lte,
	or,
	sql,
	type SQL
} from 'drizzle-orm';
import { db, type DbOrTx, type Tx } from '../db';
import { auditChain, auditEvents } from '../db/schema';
import { z } from 'zod';
import { auditRowHash, canonicalJson, GENESIS_HASH } from './chain';

export interface Actor {
	id: number | null;
	label: string;
	address?: string | null;
}

export interface AuditInput {
	action: string;
	entityType: string;
	entityId?: string | number | null;
	oldValues?: unknown;
	newValues?: unknown;
	reason?: string | null;
}

/** Values as they are stored: canonical JSON round-tripped, so the hash verifies after reading. */
const storable = (v: unknown) =>
	v === undefined || v === null ? null : JSON.parse(canonicalJson(v));

/**
 * Appends one event to the audit trail inside the caller's transaction, chained to the previous
 * event. The chain head row is locked, so concurrent writers queue instead of forking the chain.
 */
export async function recordAudit(tx: Tx, actor: Actor | null, input: AuditInput): Promise<number> {
	const [head] = await tx.select().from(auditChain).where(eq(auditChain.id, 1)).for('update');
	const prevSeq = head?.lastSeq ?? 0;
	const prevHash = head?.lastHash ?? GENESIS_HASH;
	const at = new Date();
	const fields = {
		seq: prevSeq + 1,
		at,
		actorId: actor?.id ?? null,
		actorLabel: actor?.label ?? 'system',
		action: input.action,
		entityType: input.entityType,
		entityId: input.entityId == null ? null : String(input.entityId),
		oldValues: storable(input.oldValues),
		newValues: storable(input.newValues),
		reason: input.reason ?? null,
		address: actor?.address ?? null
	};
	const hash = auditRowHash(prevHash, fields);
	await tx.insert(auditEvents).values({ ...fields, prevHash, hash });
	if (head) {
		await tx
			.update(auditChain)
			.set({ lastSeq: fields.seq, lastHash: hash })
			.where(eq(auditChain.id, 1));
	} else {
		await tx.insert(auditChain).values({ id: 1, lastSeq: fields.seq, lastHash: hash });
	}
	return fields.seq;
}

/** Writes a single audit event in its own transaction (sign-ins, denied attempts, exports). */
export async function recordAuditNow(actor: Actor | null, input: AuditInput): Promise<number> {
	return db.transaction((tx) => recordAudit(tx, actor, input));
}

export interface ChainProblem {
	seq: number;
	problem: string;
}

export interface ChainVerification {
	ok: boolean;
	/** Rows read and re-hashed. */
	checked: number;
	problems: ChainProblem[];
	/** The chain head at the moment of the check: its seq and hash (0 and the genesis hash when empty). */
	headSeq: number;
	headHash: string;
	/** Every row from seq 1 up to this one verifies (the head when ok). */
	verifiedUpToSeq: number;
	/** The first seq with a problem; null when the chain is intact. */
	brokenAtSeq: number | null;
}

/**
 * Re-computes every hash in order; reports edited rows, removed rows and a moved chain head. By
 * default it reads one consistent snapshot of the trail (a repeatable-read transaction that only reads),
 * so events written while it runs neither show up half-way nor look like a broken head.
 */
export async function verifyAuditChain(conn?: DbOrTx): Promise<ChainVerification> {
	if (!conn) {
		// (No "read only": drizzle joins it to the snapshot clause without the comma MariaDB needs.)
		return db.transaction((tx) => verifyAuditChain(tx), {
			isolationLevel: 'repeatable read',
			withConsistentSnapshot: true
		});
	}
	const problems: ChainProblem[] = [];
	let prevHash = GENESIS_HASH;
	let expectedSeq = 1;
	let checked = 0;
	let lastSeq = 0;
	const pageSize = 5000;
	for (;;) {
		const rows = await conn
			.select()
			.from(auditEvents)
			.where(gt(auditEvents.seq, lastSeq))
			.orderBy(asc(auditEvents.seq))
			.limit(pageSize);
		for (const r of rows) {
			if (r.seq !== expectedSeq) {
				problems.push({
					seq: expectedSeq,
					problem: `rows ${expectedSeq}–${r.seq - 1} are missing`
				});
			}
			if (r.prevHash !== prevHash) {
				problems.push({ seq: r.seq, problem: 'does not link to the previous row' });
			}
			const hash = auditRowHash(r.prevHash, {
				...r,
				oldValues: r.oldValues ?? null,
				newValues: r.newValues ?? null
			});
			if (hash !== r.hash)
				problems.push({ seq: r.seq, problem: 'content changed after it was written' });
			prevHash = r.hash;
			expectedSeq = r.seq + 1;
			lastSeq = r.seq;
			checked++;
		}
		if (rows.length < pageSize) break;
	}
	const breaks = problems.map((p) => p.seq);
	const [head] = await conn.select().from(auditChain).where(eq(auditChain.id, 1));
	if (head && (head.lastSeq !== lastSeq || head.lastHash !== prevHash)) {
		problems.push({
			seq: head.lastSeq,
			problem:
				head.lastSeq > lastSeq
					? 'the newest rows are missing (chain head points past them)'
					: 'the chain head does not match the newest row'
		});
		// Where the break starts: the first missing row, the first row past the head, or the head.
		breaks.push(
			head.lastSeq > lastSeq
				? lastSeq + 1
				: head.lastSeq < lastSeq
					? head.lastSeq + 1
					: head.lastSeq
		);
	}
	const brokenAtSeq = breaks.length ? Math.min(...breaks) : null;
	return {
		ok: problems.length === 0,
		checked,
		problems,
		headSeq: head?.lastSeq ?? lastSeq,
		headHash: head?.lastHash ?? prevHash,
		verifiedUpToSeq: brokenAtSeq == null ? lastSeq : brokenAtSeq - 1,
		brokenAtSeq
	};
}

/** The verification in words, as exports and pages state it. */
export function describeChainVerification(
	v: Pick<
		ChainVerification,
		'ok' | 'checked' | 'headSeq' | 'headHash' | 'verifiedUpToSeq' | 'brokenAtSeq'
	> & { problems: ChainProblem[] | number; firstProblem?: string }
): string {
	if (v.ok)
		return v.headSeq === 0
			? 'Audit chain verified: the trail is empty.'
			: `Audit chain verified up to seq ${v.headSeq}: all ${v.checked} rows from seq 1 match their hashes and link to the row before, and the chain head matches the newest row (hash ${v.headHash.slice(0, 16)}…).`;
	const count = Array.isArray(v.problems) ? v.problems.length : v.problems;
	const first =
		v.firstProblem ??
		(Array.isArray(v.problems)
			? [...v.problems].sort((a, b) => a.seq - b.seq)[0]?.problem
			: undefined);
	return `Audit chain BROKEN at seq ${v.brokenAtSeq}${first ? ` (${first})` : ''}: ${count} problem${count === 1 ? '' : 's'} in all; only rows up to seq ${v.verifiedUpToSeq} verify. A row was changed or removed after it was written.`;
}

/**
 * Verifies the whole chain and records that it did ('audit.verify' with the result), so the last
 * verification can be shown without reading the trail again.
 */
export async function verifyAuditChainRecorded(actor: Actor | null, via: 'page' | 'export') {
	const started = performance.now();
	const result = await verifyAuditChain();
	const ms = Math.round(performance.now() - started);
	const sorted = [...result.problems].sort((a, b) => a.seq - b.seq);
	await recordAuditNow(actor, {
		action: 'audit.verify',
		entityType: 'audit_trail',
		newValues: {
			ok: result.ok,
			checked: result.checked,
			problems: result.problems.length,
			firstProblem: sorted[0]?.problem ?? null,
			headSeq: result.headSeq,
			headHash: result.headHash,
			verifiedUpToSeq: result.verifiedUpToSeq,
			brokenAtSeq: result.brokenAtSeq,
			via
		}
	});
	return { ...result, ms };
}

const verifyRecord = z.object({
	ok: z.boolean(),
	checked: z.number(),
	problems: z.number(),
	firstProblem: z.string().nullable().optional(),
	headSeq: z.number(),
	headHash: z.string(),
	verifiedUpToSeq: z.number(),
	brokenAtSeq: z.number().nullable()
});

/**
 * The newest recorded verification of the chain (from the page or an export): when, by whom, and
 * the result; null when none has been recorded in the current form.
 */
export async function lastChainVerification() {
	const [row] = await db
		.select({
			seq: auditEvents.seq,
			at: auditEvents.at,
			actorLabel: auditEvents.actorLabel,
			newValues: auditEvents.newValues
		})
		.from(auditEvents)
		.where(eq(auditEvents.action, 'audit.verify'))
		.orderBy(desc(auditEvents.seq))
		.limit(1);
	const parsed = row ? verifyRecord.safeParse(row.newValues) : null;
	if (!row || !parsed?.success) return null;
	const v = parsed.data;
	return {
		seq: row.seq,
		at: row.at,
		by: row.actorLabel,
		...v,
		statement: describeChainVerification({ ...v, firstProblem: v.firstProblem ?? undefined })
	};
}

export interface AuditFilter {
	/** Matched against actor, action, entity id, reason and the old and new values. */
	q?: string;
	action?: string;
	entityType?: string;
	entityId?: string;
	actorId?: number;
	/** Only events without a signed-in actor (start-up, seed, machines). */
	systemActor?: boolean;
	from?: Date;
	/** Inclusive upper bound. */
	to?: Date;
	/** Exclusive upper bound (the start of the day after a "to" date). */
	before?: Date;
	/** Only rows up to this sequence number (a stable end for exports). */
	upToSeq?: number;
	page?: number;
	pageSize?: number;
}

/** The WHERE condition of a filter, shared by the list, the count and the export. */
export function auditWhere(f: AuditFilter): SQL | undefined {
	const where: SQL[] = [];
	if (f.action) where.push(eq(auditEvents.action, f.action));
	if (f.entityType) where.push(eq(auditEvents.entityType, f.entityType));
	if (f.entityId) where.push(eq(auditEvents.entityId, f.entityId));
	if (f.actorId) where.push(eq(auditEvents.actorId, f.actorId));
	if (f.systemActor) where.push(isNull(auditEvents.actorId));
	if (f.from) where.push(gte(auditEvents.at, f.from));
	if (f.to) where.push(lte(auditEvents.at, f.to));
	if (f.before) where.push(lt(auditEvents.at, f.before));
	if (f.upToSeq !== undefined) where.push(lte(auditEvents.seq, f.upToSeq));
	if (f.q) {
		const q = `%${f.q.replace(/[%_\\]/g, (c) => '\\' + c)}%`;
		// JSON columns compare in binary collation; lower-casing both sides makes the search case-blind.
		const lowered = q.toLowerCase();
		const m = or(
			like(auditEvents.actorLabel, q),
			like(auditEvents.entityId, q),
			like(auditEvents.reason, q),
			like(auditEvents.action, q),
			like(sql`lower(${auditEvents.oldValues})`, lowered),
			like(sql`lower(${auditEvents.newValues})`, lowered)
		);
		if (m) where.push(m);
	}
	return where.length ? and(...where) : undefined;
}

/** A page of audit events, newest first, for the audit trail screen. */
export async function listAuditEvents(f: AuditFilter) {
	const pageSize = f.pageSize ?? 50;
	const page = Math.max(1, f.page ?? 1);
	const cond = auditWhere(f);
	const rows = await db
		.select()
		.from(auditEvents)
		.where(cond)
		.orderBy(desc(auditEvents.seq))
		.limit(pageSize)
		.offset((page - 1) * pageSize);
	const [{ total }] = await db
		.select({ total: sql<number>`count(*)` })
		.from(auditEvents)
		.where(cond);
	const actions = await db
		.selectDistinct({ action: auditEvents.action })
		.from(auditEvents)
		.orderBy(asc(auditEvents.action));
	return { rows, total: Number(total), page, pageSize, actions: actions.map((a) => a.action) };
}

/** The choices of the filter form: every action, entity type and actor in the trail. */
export async function listAuditFacets() {
	const [actions, entityTypes, actors] = await Promise.all([
		db.selectDistinct({ v: auditEvents.action }).from(auditEvents).orderBy(asc(auditEvents.action)),
		db
			.selectDistinct({ v: auditEvents.entityType })
			.from(auditEvents)
			.orderBy(asc(auditEvents.entityType)),
		db
			.select({ id: auditEvents.actorId, label: sql<string>`max(${auditEvents.actorLabel})` })
			.from(auditEvents)
			.where(isNotNull(auditEvents.actorId))
			.groupBy(auditEvents.actorId)
	]);
	return {
		actions: actions.map((a) => a.v),
		entityTypes: entityTypes.map((e) => e.v),
		actors: actors
			.map((a) => ({ id: Number(a.id), label: a.label }))
			.sort((a, b) => a.label.localeCompare(b.label))
	};
}

/**
 * The rows of a filter, newest first, in batches (keyset paging on seq), so an export of a long
 * trail never holds it all in memory.
 */
export async function* auditEventBatches(f: AuditFilter, batchSize = 1000) {
	let below: number | undefined;
	for (;;) {
		const cond = auditWhere(f);
		const rows = await db
			.select()
			.from(auditEvents)
			.where(below === undefined ? cond : and(cond, lt(auditEvents.seq, below)))
			.orderBy(desc(auditEvents.seq))
			.limit(batchSize);
		if (rows.length) yield rows;
		if (rows.length < batchSize) return;
		below = rows[rows.length - 1].seq;
	}
}

/** How many rows a filter matches and the newest seq among them. */
export async function countAuditEvents(f: AuditFilter) {
	const [r] = await db
		.select({ n: sql<number>`count(*)`, maxSeq: sql<number | null>`max(${auditEvents.seq})` })
		.from(auditEvents)
		.where(auditWhere(f));
	return { rows: Number(r.n), maxSeq: r.maxSeq == null ? 0 : Number(r.maxSeq) };
}

/** The audit actor for a request: the signed-in person and the client address. */
export function actorFrom(event: { locals: App.Locals; getClientAddress: () => string }): Actor {
	const u = event.locals.user;
	let address: string | null = null;
	try {
		address = event.getClientAddress();
	} catch {
		address = null;
	}
	return { id: u?.id ?? null, label: u?.displayName ?? 'anonymous', address };
}
