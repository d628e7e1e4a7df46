// Certification rules: versioned per process; the version in force is the newest whose activeFrom
// has passed.
import { and, asc, desc, eq, inArray, isNull, lte } from 'drizzle-orm';
import { db, type DbOrTx } from '../db';
import {
	certificationRules,
	checklists,
	instructions,
	knowledgeChecks,
	people,
	processes,
	ruleInstructions
} from '../db/schema';
import { recordAudit, type Actor } from '../audit';
import { changedValues } from '../audit/diff';
import { isDuplicateKey, Refusal } from '../errors';
import { parseReminderDays, type RuleInput } from '../../schemas/training';
import { zonedToUtc } from '../../time';

export type RuleRow = typeof certificationRules.$inferSelect;
export interface RuleInForce extends RuleRow {
	instructionIds: number[];
}

/** The rule version in force for a process at `now`, with the instructions it asks to acknowledge. */
export async function ruleInForce(
	processId: number,
	now: Date = new Date(),
	conn: DbOrTx = db
): Promise<RuleInForce | null> {
	const [rule] = await conn
		.select()
		.from(certificationRules)
		.where(
			and(eq(certificationRules.processId, processId), lte(certificationRules.activeFrom, now))
		)
		.orderBy(desc(certificationRules.version))
		.limit(1);
	if (!rule) return null;
	const ins = await conn
		.select({ instructionId: ruleInstructions.instructionId })
		.from(ruleInstructions)
		.where(eq(ruleInstructions.ruleId, rule.id));
	return { ...rule, instructionIds: ins.map((r) => r.instructionId) };
}

/** Rule rows by id with their instruction lists (certificates record the version they were issued under). */
export async function rulesById(
	ids: number[],
	conn: DbOrTx = db
): Promise<Map<number, RuleInForce>> {
	const out = new Map<number, RuleInForce>();
	if (!ids.length) return out;
	const rows = await conn
		.select()
		.from(certificationRules)
		.where(inArray(certificationRules.id, ids));
	const ins = await conn
		.select()
		.from(ruleInstructions)
		.where(inArray(ruleInstructions.ruleId, ids));
	for (const r of rows) out.set(r.id, { ...r, instructionIds: [] });
	for (const i of ins) out.get(i.ruleId)?.instructionIds.push(i.instructionId);
	return out;
}

/** The widest reminder offset: from that many days before expiry a certificate reads "expiring". */
export function expiringWindowDays(rule: Pick<RuleRow, 'reminderDays'>): number {
	return rule.reminderDays.length ? Math.max(...rule.reminderDays) : 30;
}

// ---------------------------------------------------------------------------------------------
// Versions: listing, history and saving the next version (quality only).

/** What a rule version asks for, as saved (a new row per version; old rows are never edited). */
export interface RuleValues {
	instructionIds: number[];
	checkId: number | null;
	passMarkPct: number;
	practicalRequired: boolean;
	checklistId: number | null;
	validityMonths: number;
	graceDays: number;
	reminderDays: number[];
	showFullNameOnVerify: boolean;
	note: string | null;
	activeFrom: Date;
}

interface Lookups {
	instructions: Map<number, { docNumber: string; title: string }>;
	checks: Map<number, { code: string; title: string }>;
	checklists: Map<number, { title: string }>;
}

async function lookupsFor(rows: RuleInForce[], conn: DbOrTx = db): Promise<Lookups> {
	const insIds = [...new Set(rows.flatMap((r) => r.instructionIds))];
	const checkIds = [...new Set(rows.map((r) => r.checkId).filter((x): x is number => !!x))];
	const listIds = [...new Set(rows.map((r) => r.checklistId).filter((x): x is number => !!x))];
	const [ins, chk, lst] = await Promise.all([
		insIds.length
			? conn
					.select({
						id: instructions.id,
						docNumber: instructions.docNumber,
						title: instructions.title
					})
					.from(instructions)
					.where(inArray(instructions.id, insIds))
			: [],
		checkIds.length
			? conn
					.select({
						id: knowledgeChecks.id,
						code: knowledgeChecks.code,
						title: knowledgeChecks.title
					})
					.from(knowledgeChecks)
					.where(inArray(knowledgeChecks.id, checkIds))
			: [],
		listIds.length
			? conn
					.select({ id: checklists.id, title: checklists.title })
					.from(checklists)
					.where(inArray(checklists.id, listIds))
			: []
	]);
	return {
		instructions: new Map(ins.map((r) => [r.id, r])),
		checks: new Map(chk.map((r) => [r.id, r])),
		checklists: new Map(lst.map((r) => [r.id, r]))
	};
}

/** A rule version as the pages show it: each requirement in words. */
function describe(rule: RuleInForce, l: Lookups) {
	const docs = rule.instructionIds
		.map((id) => l.instructions.get(id)?.docNumber ?? `#${id}`)
		.sort();
	const check = rule.checkId ? (l.checks.get(rule.checkId)?.code ?? `#${rule.checkId}`) : null;
	const checklist = rule.checklistId
		? (l.checklists.get(rule.checklistId)?.title ?? `#${rule.checklistId}`)
		: null;
	const parts = [
		docs.length ? `Acknowledge ${docs.join(', ')}` : null,
		check ? `Knowledge check ${check} ≥ ${rule.passMarkPct} %` : null,
		rule.practicalRequired ? `Practical sign-off (${checklist ?? 'no checklist'})` : null,
		`valid ${rule.validityMonths} months`
	].filter(Boolean);
	return {
		id: rule.id,
		version: rule.version,
		activeFrom: rule.activeFrom,
		createdAt: rule.createdAt,
		instructions: docs,
		check,
		passMarkPct: rule.passMarkPct,
		practicalRequired: rule.practicalRequired,
		checklist,
		validityMonths: rule.validityMonths,
		graceDays: rule.graceDays,
		reminderDays: rule.reminderDays,
		showFullNameOnVerify: rule.showFullNameOnVerify,
		note: rule.note,
		summary: parts.join(' · ')
	};
}
export type RuleDescription = ReturnType<typeof describe>;

async function allVersions(processId: number | null, conn: DbOrTx = db) {
	const rows = await conn
		.select()
		.from(certificationRules)
		.where(processId ? eq(certificationRules.processId, processId) : undefined)
		.orderBy(asc(certificationRules.processId), desc(certificationRules.version));
	const map = await rulesById(
		rows.map((r) => r.id),
		conn
	);
	return rows.map((r) => map.get(r.id)!);
}

/** One row per process: the version in force now, a scheduled later one, or none at all. */
export async function listRuleOverview(now: Date = new Date()) {
	const procs = await db
		.select({
			id: processes.id,
			code: processes.code,
			name: processes.name,
			active: processes.active
		})
		.from(processes)
		.orderBy(asc(processes.code));
	const versions = await allVersions(null);
	const l = await lookupsFor(versions);
	return procs.map((p) => {
		const mine = versions.filter((v) => v.processId === p.id);
		const inForce = mine.find((v) => v.activeFrom <= now) ?? null;
		const scheduled = mine[0] && mine[0] !== inForce ? mine[0] : null;
		return {
			...p,
			versions: mine.length,
			inForce: inForce ? describe(inForce, l) : null,
			scheduled: scheduled ? { version: scheduled.version, activeFrom: scheduled.activeFrom } : null
		};
	});
}

export async function processByCode(code: string) {
	const [p] = await db
		.select({
			id: processes.id,
			code: processes.code,
			name: processes.name,
			active: processes.active
		})
		.from(processes)
		.where(eq(processes.code, code));
	return p ?? null;
}

/** Every version of a process's rule, newest first, with its standing at `now`. */
export async function ruleHistory(processId: number, now: Date = new Date()) {
	const versions = await allVersions(processId);
	const l = await lookupsFor(versions);
	const authors = versions.length
		? await db
				.select({ id: people.id, name: people.displayName })
				.from(people)
				.where(inArray(people.id, [...new Set(versions.map((v) => v.createdBy))]))
		: [];
	// Versions come into force in order, so every version above the one in force is scheduled.
	const inForce = versions.find((v) => v.activeFrom <= now);
	return versions.map((v) => ({
		...describe(v, l),
		createdBy: authors.find((a) => a.id === v.createdBy)?.name ?? '—',
		standing:
			v.id === inForce?.id
				? ('in_force' as const)
				: v.version > (inForce?.version ?? 0)
					? ('scheduled' as const)
					: ('replaced' as const)
	}));
}

/** What the next-version form may choose from: instructions, this process's checks and open checklists. */
export async function ruleFormChoices(processId: number) {
	const [ins, checks, lists] = await Promise.all([
		db
			.select({
				id: instructions.id,
				docNumber: instructions.docNumber,
				title: instructions.title,
				processId: instructions.processId
			})
			.from(instructions)
			.where(isNull(instructions.withdrawnAt))
			.orderBy(asc(instructions.docNumber)),
		db
			.select({ id: knowledgeChecks.id, code: knowledgeChecks.code, title: knowledgeChecks.title })
			.from(knowledgeChecks)
			.where(eq(knowledgeChecks.processId, processId))
			.orderBy(asc(knowledgeChecks.code)),
		db
			.select({ id: checklists.id, title: checklists.title })
			.from(checklists)
			.where(and(eq(checklists.processId, processId), isNull(checklists.retiredAt)))
			.orderBy(asc(checklists.title))
	]);
	return {
		instructions: ins.map((i) => ({ ...i, ofProcess: i.processId === processId })),
		checks,
		checklists: lists
	};
}

/** The audit trail's picture of a version: codes and titles rather than bare ids. */
function auditPicture(v: RuleValues, l: Lookups) {
	return {
		instructions: v.instructionIds.map((id) => l.instructions.get(id)?.docNumber ?? id).sort(),
		checkId: v.checkId,
		check: v.checkId ? (l.checks.get(v.checkId)?.code ?? null) : null,
		passMarkPct: v.passMarkPct,
		practicalRequired: v.practicalRequired,
		checklistId: v.checklistId,
		validityMonths: v.validityMonths,
		graceDays: v.graceDays,
		reminderDays: v.reminderDays,
		showFullNameOnVerify: v.showFullNameOnVerify,
		note: v.note,
		activeFrom: v.activeFrom.toISOString()
	};
}

/** Refuses ids that do not exist or do not belong to the process, naming the field. */
async function checkReferences(tx: DbOrTx, processId: number, v: RuleValues) {
	const fields: Record<string, string> = {};
	if (v.instructionIds.length) {
		const found = await tx
			.select({ id: instructions.id, withdrawnAt: instructions.withdrawnAt })
			.from(instructions)
			.where(inArray(instructions.id, v.instructionIds));
		const ok = new Set(found.filter((f) => !f.withdrawnAt).map((f) => f.id));
		const bad = v.instructionIds.filter((id) => !ok.has(id));
		if (bad.length)
			fields.instructionIds = `Unknown or withdrawn instruction${bad.length > 1 ? 's' : ''}: ${bad.join(', ')}`;
	}
	if (v.checkId) {
		const [c] = await tx
			.select({ processId: knowledgeChecks.processId })
			.from(knowledgeChecks)
			.where(eq(knowledgeChecks.id, v.checkId));
		if (!c || c.processId !== processId)
			fields.checkId = 'Choose a knowledge check of this process';
	}
	if (v.checklistId) {
		const [c] = await tx
			.select({ processId: checklists.processId, retiredAt: checklists.retiredAt })
			.from(checklists)
			.where(eq(checklists.id, v.checklistId));
		if (!c || c.processId !== processId || c.retiredAt)
			fields.checklistId = 'Choose a checklist of this process that is not retired';
	}
	if (v.practicalRequired && !v.checklistId)
		fields.checklistId ??= 'A practical sign-off needs its checklist';
	if (!v.instructionIds.length && !v.checkId && !v.practicalRequired)
		fields.instructionIds ??= 'Ask for at least one requirement';
	if (Object.keys(fields).length)
		throw new Refusal(400, 'Some choices do not fit this process.', fields);
}

/**
 * Saves version `previousVersion + 1` of the process's rule with its instructions and the audit
 * event, in one transaction. A version saved by someone else since `previousVersion` (or at the
 * same moment: the unique key on process + version) is a 409, never an overwrite.
 */
export async function insertRuleVersion(
	actor: Actor,
	processId: number,
	previousVersion: number,
	values: RuleValues
): Promise<{ id: number; version: number }> {
	const version = previousVersion + 1;
	const conflict = () =>
		new Refusal(
			409,
			`Someone saved version ${version} of this rule a moment ago. Reload the page to see it, then make your change on top of it.`
		);
	try {
		return await db.transaction(async (tx) => {
			const [proc] = await tx
				.select({ code: processes.code })
				.from(processes)
				.where(eq(processes.id, processId));
			if (!proc) throw new Refusal(404, 'No such process');
			await checkReferences(tx, processId, values);
			const [latest] = await tx
				.select({ version: certificationRules.version, id: certificationRules.id })
				.from(certificationRules)
				.where(eq(certificationRules.processId, processId))
				.orderBy(desc(certificationRules.version))
				.limit(1);
			if ((latest?.version ?? 0) !== previousVersion) throw conflict();
			const prev = latest ? (await rulesById([latest.id], tx)).get(latest.id)! : null;
			if (prev && values.activeFrom < prev.activeFrom)
				throw new Refusal(400, 'Versions come into force in order.', {
					activeFromDate: `Version ${version} cannot come into force before version ${prev.version} (${prev.activeFrom.toISOString()})`
				});
			const [{ id }] = await tx
				.insert(certificationRules)
				.values({
					processId,
					version,
					checkId: values.checkId,
					passMarkPct: values.passMarkPct,
					practicalRequired: values.practicalRequired,
					checklistId: values.practicalRequired ? values.checklistId : null,
					validityMonths: values.validityMonths,
					graceDays: values.graceDays,
					reminderDays: values.reminderDays,
					showFullNameOnVerify: values.showFullNameOnVerify,
					note: values.note,
					createdBy: actor.id!,
					activeFrom: values.activeFrom
				})
				.$returningId();
			const insIds = [...new Set(values.instructionIds)];
			if (insIds.length)
				await tx
					.insert(ruleInstructions)
					.values(insIds.map((instructionId) => ({ ruleId: id, instructionId })));
			const l = await lookupsFor(prev ? [prev] : [], tx);
			const more = await lookupsFor(
				[{ ...values, id, instructionIds: insIds } as unknown as RuleInForce],
				tx
			);
			for (const k of ['instructions', 'checks', 'checklists'] as const)
				for (const [key, val] of more[k]) (l[k] as Map<number, unknown>).set(key, val);
			const next = auditPicture({ ...values, instructionIds: insIds }, l);
			const before = prev ? auditPicture(prev, l) : null;
			const diff = before ? changedValues(before, next) : null;
			await recordAudit(tx, actor, {
				action: 'rule.versioned',
				entityType: 'certification_rule',
				entityId: id,
				oldValues: prev ? { version: prev.version, ...diff!.before } : null,
				newValues: {
					process: proc.code,
					version,
					...next,
					changed: diff ? Object.keys(diff.after) : Object.keys(next)
				}
			});
			return { id, version };
		});
	} catch (err) {
		if (isDuplicateKey(err)) throw conflict();
		throw err;
	}
}

/**
 * The form's input as a version: "active from" read in the plant's zone (empty = now); a moment
 * more than five minutes ago is refused, so nobody rewrites which rule was in force in the past.
 */
export async function createRuleVersion(
	actor: Actor,
	processId: number,
	input: RuleInput,
	opts: { timeZone: string; now?: Date }
) {
	const now = opts.now ?? new Date();
	const reminderDays = parseReminderDays(input.reminderDays, input.validityMonths);
	if (typeof reminderDays === 'string') throw new Refusal(400, reminderDays, { reminderDays });
	let activeFrom = now;
	if (input.activeFromDate) {
		activeFrom = zonedToUtc(input.activeFromDate, input.activeFromTime || '00:00', opts.timeZone);
		if (activeFrom.getTime() < now.getTime() - 5 * 60_000)
			throw new Refusal(400, 'That moment has passed.', {
				activeFromDate: 'Choose now (leave empty) or a later date and time, plant time'
			});
		if (activeFrom < now) activeFrom = now;
	}
	return insertRuleVersion(actor, processId, input.previousVersion, {
		instructionIds: input.instructionIds,
		checkId: input.checkId,
		passMarkPct: input.passMarkPct,
		practicalRequired: input.practicalRequired,
		checklistId: input.checklistId,
		validityMonths: input.validityMonths,
		graceDays: input.graceDays,
		reminderDays,
		showFullNameOnVerify: input.showFullNameOnVerify,
		note: input.note || null,
		activeFrom
	});
}

/** The form's starting values: the newest version's, or the defaults with this process's instructions. */
export async function nextVersionDefaults(processId: number): Promise<Partial<RuleInput>> {
	const [latest] = await allVersions(processId);
	if (!latest) {
		const own = await db
			.select({ id: instructions.id })
			.from(instructions)
			.where(and(eq(instructions.processId, processId), isNull(instructions.withdrawnAt)));
		return { previousVersion: 0, instructionIds: own.map((r) => r.id) };
	}
	return {
		previousVersion: latest.version,
		instructionIds: latest.instructionIds,
		checkId: latest.checkId,
		passMarkPct: latest.passMarkPct,
		practicalRequired: latest.practicalRequired,
		checklistId: latest.checklistId,
		validityMonths: latest.validityMonths,
		graceDays: latest.graceDays,
		reminderDays: latest.reminderDays.join(', '),
		showFullNameOnVerify: latest.showFullNameOnVerify,
		note: ''
	};
}
