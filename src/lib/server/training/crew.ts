// The line lead's view of the crew: each person of the line × each process assigned to them, with
// how far they are along the certification rule in force.
import { and, asc, eq, inArray, isNull } from 'drizzle-orm';
import { db } from '../db';
import { assignments, people, shifts } from '../db/schema';
import { evaluatePeople } from '../certificates/evaluate';
import type { SessionUser } from '../auth/sessions';
import { QUALIFYING_STATUSES, type CertificateStatus } from '../../training/vocabulary';
import { localDate } from '../../time';
import { reachableLines } from './assignments';

/** Where a person stands on one assigned process, as a word the page shows with an icon. */
export type CrewState = 'certified' | 'ready' | 'in_progress' | 'not_started' | 'no_rule';

export interface CrewItem {
	processCode: string;
	processName: string;
	dueOn: string | null;
	overdue: boolean;
	met: number;
	total: number;
	nextStep: string | null;
	state: CrewState;
	certificate: { number: string; status: CertificateStatus; expiresAt: Date } | null;
}

/**
 * The crew of one line in the viewer's reach (a lead: their own; quality and admin: any, the first
 * by default). Null when the viewer reaches no line or asks for one outside their reach.
 */
export async function crewProgress(
	user: Pick<SessionUser, 'id' | 'roles' | 'siteId' | 'timeZone'>,
	lineId: number | null,
	now: Date = new Date()
) {
	const lines = await reachableLines(user);
	const line = lineId ? lines.find((l) => l.id === lineId) : lines[0];
	if (!line) return { lines, line: null, people: [] };

	const crew = await db
		.select({ id: people.id, name: people.displayName, shift: shifts.code })
		.from(people)
		.leftJoin(shifts, eq(shifts.id, people.shiftId))
		.where(and(eq(people.lineId, line.id), eq(people.active, true)))
		.orderBy(asc(shifts.code), asc(people.displayName));
	const ids = crew.map((p) => p.id);
	const open = ids.length
		? await db
				.select({
					personId: assignments.personId,
					processId: assignments.processId,
					dueOn: assignments.dueOn
				})
				.from(assignments)
				.where(and(inArray(assignments.personId, ids), isNull(assignments.closedAt)))
		: [];
	const processIds = [...new Set(open.map((a) => a.processId))];
	const evaluations = processIds.length ? await evaluatePeople(ids, processIds, now) : [];
	const byKey = new Map(evaluations.map((e) => [`${e.personId}:${e.processId}`, e]));
	const today = localDate(now, user.timeZone);

	return {
		lines,
		line,
		people: crew.map((p) => {
			const items: CrewItem[] = open
				.filter((a) => a.personId === p.id)
				.map((a) => {
					const e = byKey.get(`${p.id}:${a.processId}`);
					const reqs = e?.requirements ?? [];
					const met = reqs.filter((r) => r.met).length;
					const cert = e?.certificate ?? null;
					const qualified = !!cert && QUALIFYING_STATUSES.includes(cert.status);
					const state: CrewState = !e?.ruleId
						? 'no_rule'
						: qualified
							? 'certified'
							: e.met
								? 'ready'
								: met > 0
									? 'in_progress'
									: 'not_started';
					return {
						processCode: e?.processCode ?? `#${a.processId}`,
						processName: e?.processName ?? '',
						dueOn: a.dueOn,
						overdue: !!a.dueOn && a.dueOn < today && state !== 'certified',
						met,
						total: reqs.length,
						nextStep: reqs.find((r) => !r.met)?.label ?? null,
						state,
						certificate: cert
							? { number: cert.number, status: cert.status, expiresAt: cert.expiresAt }
							: null
					};
				})
				.sort((x, y) => x.processCode.localeCompare(y.processCode));
			return { id: p.id, name: p.name, shift: p.shift, items };
		})
	};
}
