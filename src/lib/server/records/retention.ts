// The retention run. One function builds the plan: people whose employment ended more than the
// training-records period ago (not anonymised, not under an open legal hold) and gate log rows
// older than the gate-log period (not of a held person). A dry run records and returns exactly
// that plan; a real run builds the same plan inside its transaction and applies it: each person
// is anonymised (records, numbers and dates stay; name and identifiers go), gate log rows are
// purged in batches through the definer-rights procedures, and every disposition is recorded.
// A second run finds nothing left to do.
import { and, asc, desc, eq, inArray, isNotNull, isNull, lte, or, sql } from 'drizzle-orm';
import { alias } from 'drizzle-orm/mysql-core';
import { db, type DbOrTx, type Tx } from '../db';
import {
	authSessions,
	certificates,
	jobLeases,
	legalHolds,
	mailOutbox,
	people,
	retentionDispositions,
	retentionRuns,
	signInFailures
} from '../db/schema';
import { recordAudit, type Actor } from '../audit';
import { reauthenticate } from '../auth/reauth';
import { Refusal } from '../errors';
import { addMonthsToDate } from '../certificates/issue';
import { MAX_ATTEMPTS } from '../mail/outbox';
import { retireIdentifiers } from '../people/retired';
import { loadSiteZones } from '../people/zones';
import { deleteObject } from '../storage';
import { faultPoint } from '../faults';
import {
	anonymisedEmployeeNo,
	anonymisedName,
	type RetentionSummary
} from '../../records/retention';

export type { RetentionSummary };
import type { RetentionRecordType } from '../../records/vocabulary';
import { getRetentionRules, type RulesInForce } from './retention-rules';

/** Gate log rows removed per procedure call (and per disposition row). */
export const GATE_BATCH_ROWS = 10_000;
/** The job_leases row a real run locks, so two runs never apply at the same time. */
const RUN_LOCK = 'retention-run:lock';
const REDACTED = '(removed by retention)';

export interface PlannedPerson {
	id: number;
	employeeNo: string;
	displayName: string;
	employmentEndedOn: string;
	/** The last day the records are kept under the rule (the run after it anonymises). */
	keptUntil: string;
}

export interface HeldPerson extends PlannedPerson {
	holdId: number;
	heldSince: Date;
}

export interface GateBatch {
	fromId: number;
	toId: number;
	fromAt: Date;
	toAt: Date;
	count: number;
}

export interface RetentionPlan {
	asOf: Date;
	rules: Record<RetentionRecordType, { years: number; source: 'rule' | 'default' }>;
	/** To anonymise. */
	people: PlannedPerson[];
	/** Past retention but under an open legal hold: left alone. */
	held: HeldPerson[];
	gateLog: { before: Date; count: number; batches: GateBatch[]; heldRows: number };
}

/** The same instant `years` calendar years earlier (UTC). */
function yearsBefore(at: Date, years: number): Date {
	const d = new Date(at);
	d.setUTCFullYear(d.getUTCFullYear() - years);
	return d;
}

function affectedOf(result: unknown): number {
	// CALL answers [[{ affected }], header] through mysql2; look for the row wherever it sits.
	const seen = new Set<unknown>();
	const walk = (v: unknown): number | null => {
		if (!v || typeof v !== 'object' || seen.has(v)) return null;
		seen.add(v);
		if ('affected' in v) return Number((v as { affected: unknown }).affected);
		for (const x of Array.isArray(v) ? v : Object.values(v)) {
			const n = walk(x);
			if (n !== null) return n;
		}
		return null;
	};
	const n = walk(result);
	if (n === null || !Number.isFinite(n)) throw new Error('retention procedure gave no row count');
	return n;
}

// The same condition the gate log procedures use (drizzle/0007_retention_procedures.sql).
const openHoldPeople = sql.raw('(SELECT person_id FROM legal_holds WHERE released_at IS NULL)');

/**
 * What a run at `asOf` would do. With `lock`, the people rows in the plan are locked, so nobody
 * can place a hold on them or rehire them until the transaction ends.
 */
export async function buildRetentionPlan(
	conn: DbOrTx,
	asOf: Date,
	opts: { lock?: boolean; rules?: RulesInForce; batchRows?: number } = {}
): Promise<RetentionPlan> {
	const batchRows = opts.batchRows ?? GATE_BATCH_ROWS;
	const rules = opts.rules ?? (await getRetentionRules(conn));
	const trainingYears = rules.training_records.years;
	const gateYears = rules.gate_log.years;

	const zones = await loadSiteZones(conn);
	// The furthest-ahead plant date bounds the query; each person is judged in their own zone.
	const latestToday = zones.latestToday(asOf);
	const query = conn
		.select({
			id: people.id,
			employeeNo: people.employeeNo,
			displayName: people.displayName,
			siteId: people.siteId,
			employmentEndedOn: people.employmentEndedOn
		})
		.from(people)
		.where(
			and(
				isNull(people.anonymisedAt),
				eq(people.active, false),
				isNotNull(people.employmentEndedOn),
				// A day of slack for 29 February; the filter below is exact.
				lte(people.employmentEndedOn, addMonthsToDate(latestToday, -12 * trainingYears))
			)
		)
		.orderBy(asc(people.id));
	const candidates = opts.lock ? await query.for('update') : await query;
	const due = candidates
		.map((c) => ({
			id: c.id,
			employeeNo: c.employeeNo,
			displayName: c.displayName,
			employmentEndedOn: c.employmentEndedOn!,
			keptUntil: addMonthsToDate(c.employmentEndedOn!, 12 * trainingYears),
			today: zones.todayOf(c.siteId, asOf)
		}))
		.filter((c) => c.keptUntil < c.today)
		.map(({ today: _today, ...p }) => p);
	const holds = due.length
		? await conn
				.select({ id: legalHolds.id, personId: legalHolds.personId, placedAt: legalHolds.placedAt })
				.from(legalHolds)
				.where(
					and(
						isNull(legalHolds.releasedAt),
						inArray(
							legalHolds.personId,
							due.map((p) => p.id)
						)
					)
				)
		: [];
	const holdOf = new Map(holds.map((h) => [h.personId, h]));

	const before = yearsBefore(asOf, gateYears);
	const [batchResult] = (await conn.execute(sql`
		SELECT MIN(id) AS fromId, MAX(id) AS toId, MIN(at) AS fromAt, MAX(at) AS toAt, COUNT(*) AS n
		FROM (
			SELECT id, at, FLOOR((ROW_NUMBER() OVER (ORDER BY id) - 1) / ${batchRows}) AS batch
			FROM gate_checks
			WHERE at < ${before} AND (person_id IS NULL OR person_id NOT IN ${openHoldPeople})
		) eligible
		GROUP BY batch ORDER BY batch`)) as unknown as [
		{ fromId: number; toId: number; fromAt: Date; toAt: Date; n: number }[]
	];
	const [heldRow] = (await conn.execute(sql`
		SELECT COUNT(*) AS n FROM gate_checks
		WHERE at < ${before} AND person_id IN ${openHoldPeople}`)) as unknown as [{ n: number }[]];
	const batches = batchResult.map((b) => ({
		fromId: Number(b.fromId),
		toId: Number(b.toId),
		fromAt: new Date(b.fromAt),
		toAt: new Date(b.toAt),
		count: Number(b.n)
	}));

	return {
		asOf,
		rules: {
			training_records: { years: trainingYears, source: rules.training_records.source },
			gate_log: { years: gateYears, source: rules.gate_log.source }
		},
		people: due.filter((p) => !holdOf.has(p.id)),
		held: due
			.filter((p) => holdOf.has(p.id))
			.map((p) => ({ ...p, holdId: holdOf.get(p.id)!.id, heldSince: holdOf.get(p.id)!.placedAt })),
		gateLog: {
			before,
			count: batches.reduce((n, b) => n + b.count, 0),
			batches,
			heldRows: Number(heldRow[0]?.n ?? 0)
		}
	};
}

function summarise(plan: RetentionPlan): RetentionSummary {
	return {
		asOf: plan.asOf.toISOString(),
		rules: plan.rules,
		training: {
			due: plan.people.length,
			personIds: plan.people.map((p) => p.id),
			held: plan.held.length,
			heldPersonIds: plan.held.map((p) => p.id)
		},
		gateLog: {
			before: plan.gateLog.before.toISOString(),
			rows: plan.gateLog.count,
			batches: plan.gateLog.batches.map(({ fromId, toId, count }) => ({ fromId, toId, count })),
			heldRows: plan.gateLog.heldRows
		}
	};
}

interface Anonymised {
	pdfKeys: string[];
	gateBadges: number;
	sessionsEnded: number;
	messages: number;
}

/** Drops one person's name and identifiers; their records, numbers and dates stay. */
async function anonymisePerson(
	tx: Tx,
	runId: number,
	planned: PlannedPerson,
	rule: { years: number; source: string },
	at: Date
): Promise<Anonymised> {
	const [p] = await tx.select().from(people).where(eq(people.id, planned.id));
	const retired = await retireIdentifiers(
		tx,
		{ employee_no: p.employeeNo, badge_no: p.badgeNo, email: p.email },
		at
	);
	// Throttle rows keyed by the sign-in name (`password:<e-mail>`, `badge:<badge>`).
	const accounts = [
		p.email && `password:${p.email.toLowerCase()}`,
		p.badgeNo && `badge:${p.badgeNo.toLowerCase()}`
	].filter((a): a is string => !!a);
	if (accounts.length) {
		await tx
			.delete(signInFailures)
			.where(
				and(eq(signInFailures.keyType, 'account'), inArray(signInFailures.keyValue, accounts))
			);
	}
	await tx
		.update(people)
		.set({
			displayName: anonymisedName(p.id),
			employeeNo: anonymisedEmployeeNo(p.id),
			email: null,
			badgeNo: null,
			passwordHash: null,
			pinHash: null,
			locale: 'en',
			anonymisedAt: at,
			sessionVersion: p.sessionVersion + 1
		})
		.where(eq(people.id, p.id));
	const ended = await tx
		.update(authSessions)
		.set({ revokedAt: at })
		.where(and(eq(authSessions.personId, p.id), isNull(authSessions.revokedAt)));
	await tx.update(authSessions).set({ address: null }).where(eq(authSessions.personId, p.id));
	// Mail to or about the person carried their name and address; unsent mail is withdrawn.
	const redacted = await tx
		.update(mailOutbox)
		.set({
			subject: REDACTED,
			textBody: REDACTED,
			htmlBody: `<p>${REDACTED}</p>`,
			toAddress: sql`case when ${mailOutbox.toPersonId} = ${p.id} then 'anonymised' else ${mailOutbox.toAddress} end`,
			attempts: sql`case when ${mailOutbox.sentAt} is null then ${MAX_ATTEMPTS} else ${mailOutbox.attempts} end`,
			lastError: sql`case when ${mailOutbox.sentAt} is null then 'withdrawn: the person was anonymised by retention' else ${mailOutbox.lastError} end`
		})
		.where(or(eq(mailOutbox.toPersonId, p.id), eq(mailOutbox.aboutPersonId, p.id)));
	// Stored PDFs print the name; without a key ensureCertificatePdf makes them anew, anonymised.
	const pdfs = await tx
		.select({ key: certificates.pdfKey })
		.from(certificates)
		.where(and(eq(certificates.personId, p.id), isNotNull(certificates.pdfKey)));
	if (pdfs.length) {
		await tx.update(certificates).set({ pdfKey: null }).where(eq(certificates.personId, p.id));
	}
	const gateBadges = affectedOf(
		await tx.execute(sql`CALL retention_anonymise_gate_checks(${p.id})`)
	);
	const detail = {
		rule: { recordType: 'training_records', years: rule.years, source: rule.source },
		employmentEndedOn: planned.employmentEndedOn,
		keptUntil: planned.keptUntil,
		identifiersRetired: retired,
		gateBadgesBlanked: gateBadges,
		certificatePdfsRemoved: pdfs.length,
		messagesRedacted: affectedRows(redacted)
	};
	await tx.insert(retentionDispositions).values({
		runId,
		recordType: 'training_records',
		entityType: 'person',
		entityId: String(p.id),
		action: 'anonymised',
		detail,
		at
	});
	await recordAudit(tx, null, {
		action: 'person.anonymised',
		entityType: 'person',
		entityId: p.id,
		newValues: {
			displayName: anonymisedName(p.id),
			employeeNo: anonymisedEmployeeNo(p.id),
			runId,
			...detail
		},
		reason: `retention: employment ended ${planned.employmentEndedOn}, kept ${rule.years} years (until ${planned.keptUntil})`
	});
	return {
		pdfKeys: pdfs.map((r) => r.key!),
		gateBadges,
		sessionsEnded: affectedRows(ended),
		messages: affectedRows(redacted)
	};
}

const affectedRows = (res: unknown) => (res as [{ affectedRows: number }])[0].affectedRows;

export interface RetentionRunResult {
	runId: number;
	dryRun: boolean;
	plan: RetentionPlan;
	summary: RetentionSummary;
}

/** Removes stored objects, returning the keys that could not be removed. */
async function removeObjects(keys: string[]): Promise<string[]> {
	const pending: string[] = [];
	for (const key of keys) {
		await deleteObject(key).catch(() => pending.push(key));
	}
	return pending;
}

/** Keys an earlier run could not remove from the store: tried again, and the earlier run updated. */
async function retryPendingObjects(): Promise<void> {
	const runs = await db
		.select({ id: retentionRuns.id, summary: retentionRuns.summary })
		.from(retentionRuns)
		.where(sql`json_length(${retentionRuns.summary}, '$.storage.pending') > 0`);
	for (const run of runs) {
		const summary = run.summary as RetentionSummary;
		const pending = await removeObjects(summary.storage!.pending);
		const removed = summary.storage!.pending.length - pending.length;
		if (!removed) continue;
		await db
			.update(retentionRuns)
			.set({
				summary: { ...summary, storage: { removed: summary.storage!.removed + removed, pending } }
			})
			.where(eq(retentionRuns.id, run.id));
	}
}

/**
 * Runs retention as of `now`. A dry run records the plan and returns it; a real run applies the
 * same plan in one transaction (actor null when the scheduler runs it).
 */
export async function runRetention(opts: {
	dryRun: boolean;
	actor: (Actor & { id: number }) | null;
	now?: Date;
	/** Gate log rows per batch (tests use small batches). */
	batchRows?: number;
}): Promise<RetentionRunResult> {
	const asOf = opts.now ?? new Date();
	const actorId = opts.actor?.id ?? null;
	if (opts.dryRun) {
		const plan = await buildRetentionPlan(db, asOf, { batchRows: opts.batchRows });
		const summary = summarise(plan);
		const runId = await db.transaction(async (tx) => {
			const [{ id }] = await tx
				.insert(retentionRuns)
				.values({ dryRun: true, actorId, startedAt: new Date(), finishedAt: new Date(), summary })
				.$returningId();
			await recordAudit(tx, opts.actor, {
				action: 'retention.dry_run',
				entityType: 'retention_run',
				entityId: id,
				newValues: summary,
				reason: 'dry run: nothing changed'
			});
			return id;
		});
		return { runId, dryRun: true, plan, summary };
	}

	await retryPendingObjects();
	await db.insert(jobLeases).ignore().values({ name: RUN_LOCK });
	const { runId, plan, summary, pdfKeys } = await db.transaction(async (tx) => {
		await tx.select().from(jobLeases).where(eq(jobLeases.name, RUN_LOCK)).for('update');
		const plan = await buildRetentionPlan(tx, asOf, { lock: true, batchRows: opts.batchRows });
		const startedAt = new Date();
		const [{ id: runId }] = await tx
			.insert(retentionRuns)
			.values({ dryRun: false, actorId, startedAt })
			.$returningId();
		await faultPoint('retention-run');
		const applied = {
			anonymised: 0,
			gateRowsDeleted: 0,
			gateBadgesBlanked: 0,
			certificatePdfsRemoved: 0,
			sessionsEnded: 0,
			messagesRedacted: 0
		};
		const pdfKeys: string[] = [];
		for (const person of plan.people) {
			const r = await anonymisePerson(tx, runId, person, plan.rules.training_records, startedAt);
			applied.anonymised++;
			applied.gateBadgesBlanked += r.gateBadges;
			applied.certificatePdfsRemoved += r.pdfKeys.length;
			applied.sessionsEnded += r.sessionsEnded;
			applied.messagesRedacted += r.messages;
			pdfKeys.push(...r.pdfKeys);
		}
		for (const batch of plan.gateLog.batches) {
			const deleted = affectedOf(
				await tx.execute(
					sql`CALL retention_purge_gate_checks(${plan.gateLog.before}, ${batch.toId})`
				)
			);
			applied.gateRowsDeleted += deleted;
			await tx.insert(retentionDispositions).values({
				runId,
				recordType: 'gate_log',
				entityType: 'gate_checks',
				entityId: `run:${runId}:${batch.fromId}-${batch.toId}`,
				action: 'deleted',
				detail: {
					rule: { recordType: 'gate_log', ...plan.rules.gate_log },
					before: plan.gateLog.before.toISOString(),
					fromId: batch.fromId,
					toId: batch.toId,
					fromAt: batch.fromAt.toISOString(),
					toAt: batch.toAt.toISOString(),
					planned: batch.count,
					count: deleted
				},
				at: startedAt
			});
		}
		const summary: RetentionSummary = { ...summarise(plan), applied };
		await tx
			.update(retentionRuns)
			.set({ finishedAt: new Date(), summary })
			.where(eq(retentionRuns.id, runId));
		await recordAudit(tx, opts.actor, {
			action: 'retention.run',
			entityType: 'retention_run',
			entityId: runId,
			newValues: summary,
			reason: opts.actor ? 'run from the Records area' : 'scheduled daily run'
		});
		return { runId, plan, summary, pdfKeys };
	});
	if (pdfKeys.length) {
		// After the commit: a failed transaction must not leave certificates pointing at lost files.
		const pending = await removeObjects(pdfKeys);
		summary.storage = { removed: pdfKeys.length - pending.length, pending };
		await db.update(retentionRuns).set({ summary }).where(eq(retentionRuns.id, runId));
	}
	return { runId, dryRun: false, plan, summary };
}

const runActor = alias(people, 'run_actor');

function runQuery() {
	return db
		.select({
			id: retentionRuns.id,
			dryRun: retentionRuns.dryRun,
			actor: runActor.displayName,
			startedAt: retentionRuns.startedAt,
			finishedAt: retentionRuns.finishedAt,
			summary: retentionRuns.summary
		})
		.from(retentionRuns)
		.leftJoin(runActor, eq(runActor.id, retentionRuns.actorId));
}

/** Recent runs, newest first, for the Records page. */
export async function listRetentionRuns(limit = 30) {
	const rows = await runQuery().orderBy(desc(retentionRuns.id)).limit(limit);
	return rows.map((r) => ({ ...r, summary: r.summary as RetentionSummary | null }));
}

/** One run with its dispositions, or the people its plan named when it was a dry run. */
export async function getRetentionRun(id: number) {
	const [run] = await runQuery().where(eq(retentionRuns.id, id));
	if (!run) return null;
	const summary = run.summary as RetentionSummary | null;
	const dispositions = await db
		.select({
			id: retentionDispositions.id,
			recordType: retentionDispositions.recordType,
			entityType: retentionDispositions.entityType,
			entityId: retentionDispositions.entityId,
			action: retentionDispositions.action,
			detail: retentionDispositions.detail,
			at: retentionDispositions.at
		})
		.from(retentionDispositions)
		.where(eq(retentionDispositions.runId, id))
		.orderBy(asc(retentionDispositions.id));
	// Names as they are now: the anonymised name once a real run has passed.
	const ids = [...(summary?.training.personIds ?? []), ...(summary?.training.heldPersonIds ?? [])];
	const named = ids.length
		? await db
				.select({
					id: people.id,
					name: people.displayName,
					employeeNo: people.employeeNo,
					employmentEndedOn: people.employmentEndedOn
				})
				.from(people)
				.where(inArray(people.id, ids))
		: [];
	return {
		...run,
		summary,
		dispositions: dispositions.map((d) => ({ ...d, detail: d.detail as Record<string, unknown> })),
		people: Object.fromEntries(named.map((p) => [p.id, p]))
	};
}

/** A real run started by a person: their password again first (a wrong one is counted and audited). */
export async function runRetentionConfirmed(
	actor: Actor & { id: number },
	password: string
): Promise<RetentionRunResult> {
	try {
		await reauthenticate(actor, password, {
			type: 'retention_run',
			id: 0,
			label: 'retention run (anonymise and purge)'
		});
	} catch (err) {
		if (err instanceof Refusal && err.status === 400) {
			throw new Refusal(400, 'That password did not match. Nothing was changed.', err.fields);
		}
		throw err;
	}
	return runRetention({ dryRun: false, actor });
}
