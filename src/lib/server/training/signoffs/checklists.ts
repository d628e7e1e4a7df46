// Practical sign-off checklists: observable steps tied to one instruction revision. Editable only
// while no sign-off uses them (a used checklist is evidence); retired instead of deleted.
import { and, asc, count, eq, inArray, isNull } from 'drizzle-orm';
import { db } from '../../db';
import {
	checklistItems,
	checklists,
	instructions,
	processes,
	revisions,
	signoffs
} from '../../db/schema';
import { recordAudit, type Actor } from '../../audit';
import { Refusal } from '../../errors';
import { displayStatus } from '../../instructions/effective';
import { loadEffectiveRevisions } from '../../instructions/queries';

export interface ChecklistInput {
	title: string;
	revisionId: number;
	items: string[];
}

/** Revisions a checklist may be tied to: approved ones that are effective now or scheduled. */
export async function listChecklistRevisionChoices(now: Date = new Date()) {
	const rows = await db
		.select({
			id: revisions.id,
			instructionId: revisions.instructionId,
			letter: revisions.letter,
			state: revisions.state,
			effectiveFrom: revisions.effectiveFrom,
			docNumber: instructions.docNumber,
			title: instructions.title,
			processCode: processes.code
		})
		.from(revisions)
		.innerJoin(instructions, eq(instructions.id, revisions.instructionId))
		.leftJoin(processes, eq(processes.id, instructions.processId))
		.where(and(eq(revisions.state, 'approved'), isNull(instructions.withdrawnAt)))
		.orderBy(asc(instructions.docNumber), asc(revisions.letter));
	const eff = await loadEffectiveRevisions(now);
	return rows
		.map((r) => ({ ...r, status: displayStatus(r, eff.get(r.instructionId)?.id ?? null, now) }))
		.filter((r) => r.status === 'effective' || r.status === 'scheduled')
		.map((r) => ({
			id: r.id,
			label: `${r.docNumber} · rev ${r.letter} · ${r.title}${r.status === 'scheduled' ? ' (scheduled)' : ''}`,
			processCode: r.processCode
		}));
}

async function revisionProcess(revisionId: number, now: Date) {
	const allowed = await listChecklistRevisionChoices(now);
	if (!allowed.some((r) => r.id === revisionId))
		throw new Refusal(400, 'Choose a revision that is in force or scheduled.', {
			revisionId: 'Choose a revision that is in force or scheduled.'
		});
	const [r] = await db
		.select({ processId: instructions.processId })
		.from(revisions)
		.innerJoin(instructions, eq(instructions.id, revisions.instructionId))
		.where(eq(revisions.id, revisionId));
	if (!r?.processId)
		throw new Refusal(400, 'That instruction is not linked to a process.', {
			revisionId: 'That instruction is not linked to a process; an admin can link it.'
		});
	return r.processId;
}

/** Every checklist with its revision, process, step count and how many sign-offs used it. */
export async function listChecklists() {
	const rows = await db
		.select({
			id: checklists.id,
			title: checklists.title,
			retiredAt: checklists.retiredAt,
			processCode: processes.code,
			docNumber: instructions.docNumber,
			letter: revisions.letter
		})
		.from(checklists)
		.innerJoin(processes, eq(processes.id, checklists.processId))
		.innerJoin(revisions, eq(revisions.id, checklists.revisionId))
		.innerJoin(instructions, eq(instructions.id, revisions.instructionId))
		.orderBy(asc(processes.code), asc(checklists.title));
	const ids = rows.map((r) => r.id);
	const counts = new Map<number, { items: number; used: number }>();
	if (ids.length) {
		const items = await db
			.select({ id: checklistItems.checklistId, n: count() })
			.from(checklistItems)
			.where(inArray(checklistItems.checklistId, ids))
			.groupBy(checklistItems.checklistId);
		const used = await db
			.select({ id: signoffs.checklistId, n: count() })
			.from(signoffs)
			.where(inArray(signoffs.checklistId, ids))
			.groupBy(signoffs.checklistId);
		for (const id of ids) counts.set(id, { items: 0, used: 0 });
		for (const i of items) counts.get(i.id)!.items = i.n;
		for (const u of used) counts.get(u.id)!.used = u.n;
	}
	return rows.map((r) => ({ ...r, ...(counts.get(r.id) ?? { items: 0, used: 0 }) }));
}

async function usageOf(checklistId: number) {
	const [{ n }] = await db
		.select({ n: count() })
		.from(signoffs)
		.where(eq(signoffs.checklistId, checklistId));
	return n;
}

/** One checklist with its steps in order; null when there is none. */
export async function getChecklist(id: number) {
	const [c] = await db
		.select({
			id: checklists.id,
			title: checklists.title,
			processId: checklists.processId,
			processCode: processes.code,
			revisionId: checklists.revisionId,
			docNumber: instructions.docNumber,
			letter: revisions.letter,
			retiredAt: checklists.retiredAt
		})
		.from(checklists)
		.innerJoin(processes, eq(processes.id, checklists.processId))
		.innerJoin(revisions, eq(revisions.id, checklists.revisionId))
		.innerJoin(instructions, eq(instructions.id, revisions.instructionId))
		.where(eq(checklists.id, id));
	if (!c) return null;
	const items = await db
		.select({ id: checklistItems.id, position: checklistItems.position, text: checklistItems.text })
		.from(checklistItems)
		.where(eq(checklistItems.checklistId, id))
		.orderBy(asc(checklistItems.position));
	return { ...c, items, used: await usageOf(id) };
}

export async function createChecklist(
	actor: Actor & { id: number },
	input: ChecklistInput,
	now: Date = new Date()
): Promise<number> {
	const processId = await revisionProcess(input.revisionId, now);
	return db.transaction(async (tx) => {
		const [{ id }] = await tx
			.insert(checklists)
			.values({ processId, revisionId: input.revisionId, title: input.title, createdBy: actor.id })
			.$returningId();
		await tx
			.insert(checklistItems)
			.values(input.items.map((text, i) => ({ checklistId: id, position: i + 1, text })));
		await recordAudit(tx, actor, {
			action: 'checklist.created',
			entityType: 'checklist',
			entityId: id,
			newValues: { title: input.title, processId, revisionId: input.revisionId, items: input.items }
		});
		return id;
	});
}

export async function updateChecklist(
	actor: Actor & { id: number },
	id: number,
	input: ChecklistInput,
	now: Date = new Date()
) {
	const processId = await revisionProcess(input.revisionId, now);
	await db.transaction(async (tx) => {
		const [c] = await tx.select().from(checklists).where(eq(checklists.id, id)).for('update');
		if (!c) throw new Refusal(404, 'No such checklist.');
		if (c.retiredAt) throw new Refusal(409, 'This checklist is retired; it can no longer change.');
		const [{ n }] = await tx
			.select({ n: count() })
			.from(signoffs)
			.where(eq(signoffs.checklistId, id));
		if (n > 0)
			throw new Refusal(
				409,
				`This checklist is the record of ${n} sign-off${n === 1 ? '' : 's'} and cannot change. Retire it and create a new one.`
			);
		const old = await tx
			.select({ text: checklistItems.text })
			.from(checklistItems)
			.where(eq(checklistItems.checklistId, id))
			.orderBy(asc(checklistItems.position));
		await tx.delete(checklistItems).where(eq(checklistItems.checklistId, id));
		await tx
			.insert(checklistItems)
			.values(input.items.map((text, i) => ({ checklistId: id, position: i + 1, text })));
		await tx
			.update(checklists)
			.set({ title: input.title, revisionId: input.revisionId, processId })
			.where(eq(checklists.id, id));
		await recordAudit(tx, actor, {
			action: 'checklist.updated',
			entityType: 'checklist',
			entityId: id,
			oldValues: {
				title: c.title,
				processId: c.processId,
				revisionId: c.revisionId,
				items: old.map((o) => o.text)
			},
			newValues: { title: input.title, processId, revisionId: input.revisionId, items: input.items }
		});
	});
}

export async function retireChecklist(actor: Actor & { id: number }, id: number, reason: string) {
	await db.transaction(async (tx) => {
		const [c] = await tx.select().from(checklists).where(eq(checklists.id, id)).for('update');
		if (!c) throw new Refusal(404, 'No such checklist.');
		if (c.retiredAt) throw new Refusal(409, 'This checklist is already retired.');
		const retiredAt = new Date();
		await tx.update(checklists).set({ retiredAt }).where(eq(checklists.id, id));
		await recordAudit(tx, actor, {
			action: 'checklist.retired',
			entityType: 'checklist',
			entityId: id,
			oldValues: { retiredAt: null },
			newValues: { retiredAt },
			reason
		});
	});
}
