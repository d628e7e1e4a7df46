// The operator's "what to do next": every process they are assigned or certified on, with the
// rule's requirements in order, the next open step, due dates and certificate status.
import { and, eq, isNull } from 'drizzle-orm';
import { db } from '../db';
import { assignments, certificates } from '../db/schema';
import { evaluatePeople, type ProcessEvaluation } from '../certificates/evaluate';
import { isQualifying } from '../../training/status';

export interface TrainingItem extends ProcessEvaluation {
	dueOn: string | null;
	overdue: boolean;
	/** The first requirement not met, in the order acknowledgement → check → sign-off. */
	next: ProcessEvaluation['requirements'][number] | null;
	/** True when nothing is left to do: a qualifying certificate, nothing to renew, no new revision to acknowledge. */
	done: boolean;
}

const ORDER = { acknowledgement: 0, check: 1, signoff: 2 } as const;

export async function trainingFor(
	personId: number,
	today: string,
	now: Date = new Date()
): Promise<TrainingItem[]> {
	const open = await db
		.select({ processId: assignments.processId, dueOn: assignments.dueOn })
		.from(assignments)
		.where(and(eq(assignments.personId, personId), isNull(assignments.closedAt)));
	const held = await db
		.selectDistinct({ processId: certificates.processId })
		.from(certificates)
		.where(eq(certificates.personId, personId));
	const due = new Map<number, string | null>();
	for (const a of open) {
		const cur = due.get(a.processId);
		if (cur === undefined || (a.dueOn && (!cur || a.dueOn < cur))) due.set(a.processId, a.dueOn);
	}
	for (const h of held) if (!due.has(h.processId)) due.set(h.processId, null);
	if (!due.size) return [];
	const evals = await evaluatePeople([personId], [...due.keys()], now);
	const items = evals.map((e): TrainingItem => {
		const requirements = [...e.requirements].sort((a, b) => ORDER[a.kind] - ORDER[b.kind]);
		const qualified = !!e.certificate && isQualifying(e.certificate.status);
		const renewing =
			!!e.certificate && ['expiring', 'retraining_due'].includes(e.certificate.status);
		const next = requirements.find((r) => !r.met) ?? null;
		// A new revision to acknowledge is always asked for, certified or not.
		const newRevision = requirements.find((r) => r.kind === 'acknowledgement' && !r.met) ?? null;
		const dueOn = due.get(e.processId) ?? null;
		const done = qualified && !renewing && !newRevision;
		return {
			...e,
			requirements,
			dueOn,
			overdue: !qualified && !!dueOn && dueOn < today,
			next: done ? null : qualified && !renewing ? newRevision : next,
			done
		};
	});
	// Open work first (overdue, then by due date), finished ones last.
	return items.sort(
		(a, b) =>
			Number(a.done) - Number(b.done) ||
			Number(b.overdue) - Number(a.overdue) ||
			(a.dueOn ?? '9999').localeCompare(b.dueOn ?? '9999') ||
			a.processCode.localeCompare(b.processCode)
	);
}
