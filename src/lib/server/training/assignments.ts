// Assignments: a process a person has to qualify on, with a due date. Assigning a line or a
// station expands to one row per active person of the line; people who already have an open
// assignment for the process are skipped.
import { and, asc, eq, inArray, isNull, lt, sql, type SQL } from 'drizzle-orm';
import { alias } from 'drizzle-orm/mysql-core';
import { db } from '../db';
import { assignments, lines, people, processes, stations } from '../db/schema';
import { recordAudit, type Actor } from '../audit';
import { queueAssignmentMail } from '../mail/events';
import { Refusal } from '../errors';
import type { SessionUser } from '../auth/sessions';
import type { AssignInput } from '../../schemas/training';
import type { Role } from '../../roles';
import { hasContractEnded } from '../../employment';
import { localDate } from '../../time';

/** Roles that may assign anywhere in their site; a lead without one of them only on their line. */
const PLANT_WIDE: Role[] = ['quality', 'trainer', 'admin'];
export const ASSIGNER_ROLES: Role[] = ['quality', 'trainer', 'lead', 'admin'];

type Viewer = Pick<SessionUser, 'id' | 'roles' | 'siteId' | 'timeZone'>;

/**
 * Where a person may assign and see assignments: the whole site, or only their own line (a lead).
 * `lineId` null with `restricted` means a lead without a line: nothing at all.
 */
export async function assignerReach(
	user: Viewer
): Promise<{ restricted: boolean; lineId: number | null }> {
	if (user.roles.some((r) => PLANT_WIDE.includes(r))) return { restricted: false, lineId: null };
	const [me] = await db
		.select({ lineId: people.lineId })
		.from(people)
		.where(eq(people.id, user.id));
	return { restricted: true, lineId: me?.lineId ?? null };
}

const siteLines = (siteId: number | null) =>
	db
		.select({ id: lines.id, code: lines.code, name: lines.name })
		.from(lines)
		.where(and(eq(lines.active, true), siteId ? eq(lines.siteId, siteId) : undefined))
		.orderBy(asc(lines.code));

/** Lines the viewer may pick (their own only, for a lead). */
export async function reachableLines(user: Viewer) {
	const reach = await assignerReach(user);
	const all = await siteLines(user.siteId);
	return reach.restricted ? all.filter((l) => l.id === reach.lineId) : all;
}

/** What the assign form offers: active processes, and the lines, stations and people in reach. */
export async function assignmentChoices(user: Viewer) {
	const lineRows = await reachableLines(user);
	const lineIds = lineRows.map((l) => l.id);
	const [procRows, stationRows, peopleRows] = await Promise.all([
		db
			.select({ id: processes.id, code: processes.code, name: processes.name })
			.from(processes)
			.where(eq(processes.active, true))
			.orderBy(asc(processes.code)),
		lineIds.length
			? db
					.select({ id: stations.id, code: stations.code, name: stations.name })
					.from(stations)
					.where(and(eq(stations.active, true), inArray(stations.lineId, lineIds)))
					.orderBy(asc(stations.code))
			: [],
		lineIds.length
			? db
					.select({ id: people.id, name: people.displayName, line: lines.code })
					.from(people)
					.innerJoin(lines, eq(lines.id, people.lineId))
					.where(and(eq(people.active, true), inArray(people.lineId, lineIds)))
					.orderBy(asc(lines.code), asc(people.displayName))
			: []
	]);
	return { processes: procRows, lines: lineRows, stations: stationRows, people: peopleRows };
}

interface Target {
	lineId: number | null;
	stationId: number | null;
	label: string;
	people: { id: number; contractEndsOn: string | null }[];
}

/** The people an assignment reaches, after checking the viewer may reach them. */
async function resolveTarget(user: Viewer, input: AssignInput): Promise<Target> {
	const reach = await assignerReach(user);
	const outside = (lineId: number | null) =>
		reach.restricted && (!lineId || lineId !== reach.lineId);
	const notYours = (field: string, what: string) =>
		new Refusal(403, `You assign on your own line only.`, {
			[field]: `${what} is not on your line; a line lead assigns on their own line only`
		});
	const site = user.siteId ? eq(lines.siteId, user.siteId) : undefined;
	const onLine = (lineId: number) =>
		db
			.select({ id: people.id, contractEndsOn: people.contractEndsOn })
			.from(people)
			.where(and(eq(people.lineId, lineId), eq(people.active, true)));

	if (input.scope === 'person') {
		const [p] = await db
			.select({
				id: people.id,
				name: people.displayName,
				lineId: people.lineId,
				active: people.active,
				siteId: people.siteId,
				contractEndsOn: people.contractEndsOn
			})
			.from(people)
			.where(eq(people.id, input.personId!));
		if (!p || (user.siteId && p.siteId !== user.siteId))
			throw new Refusal(400, 'No such person.', { personId: 'Choose a person from the list' });
		if (outside(p.lineId)) throw notYours('personId', p.name);
		if (!p.active || hasContractEnded(p.contractEndsOn, user.timeZone))
			throw new Refusal(400, 'That person is not active.', {
				personId: `${p.name} is deactivated or past their contract end`
			});
		return { lineId: p.lineId, stationId: null, label: p.name, people: [p] };
	}
	if (input.scope === 'line') {
		const [l] = await db
			.select({ id: lines.id, code: lines.code })
			.from(lines)
			.where(and(eq(lines.id, input.lineId!), site));
		if (!l) throw new Refusal(400, 'No such line.', { lineId: 'Choose a line from the list' });
		if (outside(l.id)) throw notYours('lineId', `Line ${l.code}`);
		return { lineId: l.id, stationId: null, label: `line ${l.code}`, people: await onLine(l.id) };
	}
	const [s] = await db
		.select({ id: stations.id, code: stations.code, lineId: stations.lineId })
		.from(stations)
		.innerJoin(lines, eq(lines.id, stations.lineId))
		.where(and(eq(stations.id, input.stationId!), site));
	if (!s)
		throw new Refusal(400, 'No such station.', { stationId: 'Choose a station from the list' });
	if (outside(s.lineId)) throw notYours('stationId', `Station ${s.code}`);
	return {
		lineId: s.lineId,
		stationId: s.id,
		label: `station ${s.code}`,
		people: await onLine(s.lineId)
	};
}

/**
 * Assigns a process to a person, a line or a station's line: one row per active person without an
 * open assignment for it, and one audit event with the count and scope, in one transaction.
 * `now` is the moment of assigning (the demo seed back-dates it).
 */
export async function assignProcess(
	actor: Actor,
	user: Viewer,
	input: AssignInput,
	now: Date = new Date()
): Promise<{ assigned: number; alreadyAssigned: number; label: string; process: string }> {
	const [proc] = await db
		.select({ id: processes.id, code: processes.code, active: processes.active })
		.from(processes)
		.where(eq(processes.id, input.processId));
	if (!proc || !proc.active)
		throw new Refusal(400, 'No such process.', { processId: 'Choose an active process' });
	const today = localDate(now, user.timeZone);
	if (input.dueOn && input.dueOn < today)
		throw new Refusal(400, 'The due date has passed.', {
			dueOn: `Choose today (${today}) or later, or leave it empty`
		});
	const target = await resolveTarget(user, input);
	const candidates = target.people
		.filter((p) => !hasContractEnded(p.contractEndsOn, user.timeZone, now))
		.map((p) => p.id);
	if (!candidates.length) {
		const field = { person: 'personId', line: 'lineId', station: 'stationId' }[input.scope];
		throw new Refusal(400, 'Nobody to assign.', {
			[field]: `Nobody active works on ${target.label}`
		});
	}

	return db.transaction(async (tx) => {
		// Locking the people rows queues two assigners of the same people, so nobody gets two
		// open assignments for one process.
		await tx
			.select({ id: people.id })
			.from(people)
			.where(inArray(people.id, candidates))
			.for('update');
		const open = await tx
			.select({ personId: assignments.personId })
			.from(assignments)
			.where(
				and(
					eq(assignments.processId, proc.id),
					inArray(assignments.personId, candidates),
					isNull(assignments.closedAt)
				)
			);
		const taken = new Set(open.map((o) => o.personId));
		const fresh = candidates.filter((id) => !taken.has(id));
		if (fresh.length) {
			await tx.insert(assignments).values(
				fresh.map((personId) => ({
					personId,
					processId: proc.id,
					scope: input.scope,
					lineId: input.scope === 'person' ? null : target.lineId,
					stationId: target.stationId,
					dueOn: input.dueOn || null,
					assignedBy: actor.id!,
					assignedAt: now
				}))
			);
			// Each new assignment tells its person (or their lead) in the same transaction.
			const created = await tx
				.select({ id: assignments.id })
				.from(assignments)
				.where(
					and(
						eq(assignments.processId, proc.id),
						inArray(assignments.personId, fresh),
						isNull(assignments.closedAt),
						eq(assignments.assignedAt, now)
					)
				);
			for (const a of created) await queueAssignmentMail(tx, { assignmentId: a.id, now });
			await recordAudit(tx, actor, {
				action: 'assignment.created',
				entityType: 'process',
				entityId: proc.id,
				newValues: {
					process: proc.code,
					scope: input.scope,
					target: target.label,
					lineId: target.lineId,
					stationId: target.stationId,
					dueOn: input.dueOn || null,
					count: fresh.length,
					alreadyAssigned: taken.size,
					personIds: fresh
				}
			});
		}
		return {
			assigned: fresh.length,
			alreadyAssigned: taken.size,
			label: target.label,
			process: proc.code
		};
	});
}

export interface AssignmentFilter {
	lineId?: number | null;
	processId?: number | null;
	overdue?: boolean;
}

const assigner = alias(people, 'assigner');

/** Open assignments in the viewer's reach, soonest due first. */
export async function listOpenAssignments(
	user: Viewer,
	filter: AssignmentFilter,
	now = new Date()
) {
	const reach = await assignerReach(user);
	if (reach.restricted && !reach.lineId) return [];
	const today = localDate(now, user.timeZone);
	const where: (SQL | undefined)[] = [
		isNull(assignments.closedAt),
		reach.restricted ? eq(people.lineId, reach.lineId!) : undefined,
		filter.lineId ? eq(people.lineId, filter.lineId) : undefined,
		filter.processId ? eq(assignments.processId, filter.processId) : undefined,
		filter.overdue ? lt(assignments.dueOn, today) : undefined,
		user.siteId ? eq(people.siteId, user.siteId) : undefined
	];
	const rows = await db
		.select({
			id: assignments.id,
			person: people.displayName,
			line: lines.code,
			process: processes.code,
			processName: processes.name,
			scope: assignments.scope,
			station: stations.code,
			dueOn: assignments.dueOn,
			assignedAt: assignments.assignedAt,
			assignedBy: assigner.displayName
		})
		.from(assignments)
		.innerJoin(people, eq(people.id, assignments.personId))
		.innerJoin(processes, eq(processes.id, assignments.processId))
		.innerJoin(assigner, eq(assigner.id, assignments.assignedBy))
		.leftJoin(lines, eq(lines.id, people.lineId))
		.leftJoin(stations, eq(stations.id, assignments.stationId))
		.where(and(...where))
		.orderBy(sql`${assignments.dueOn} is null`, asc(assignments.dueOn), asc(people.displayName))
		.limit(2000);
	return rows.map((r) => ({ ...r, overdue: !!r.dueOn && r.dueOn < today }));
}

/**
 * Closes an open assignment with a reason, audited. An assignment outside the viewer's reach is
 * "not found" (404), like one that does not exist.
 */
export async function closeAssignment(actor: Actor, user: Viewer, id: number, reason: string) {
	const reach = await assignerReach(user);
	await db.transaction(async (tx) => {
		const [a] = await tx
			.select({
				id: assignments.id,
				closedAt: assignments.closedAt,
				lineId: people.lineId,
				siteId: people.siteId,
				person: people.displayName,
				process: processes.code
			})
			.from(assignments)
			.innerJoin(people, eq(people.id, assignments.personId))
			.innerJoin(processes, eq(processes.id, assignments.processId))
			.where(eq(assignments.id, id))
			.for('update');
		const hidden =
			!a ||
			(user.siteId && a.siteId !== user.siteId) ||
			(reach.restricted && a.lineId !== reach.lineId);
		if (hidden) throw new Refusal(404, 'No such assignment.');
		if (a.closedAt) throw new Refusal(409, 'This assignment is already closed.');
		const closedAt = new Date();
		await tx
			.update(assignments)
			.set({ closedAt, closedReason: reason })
			.where(and(eq(assignments.id, id), isNull(assignments.closedAt)));
		await recordAudit(tx, actor, {
			action: 'assignment.closed',
			entityType: 'assignment',
			entityId: id,
			oldValues: { closedAt: null },
			newValues: { person: a.person, process: a.process, closedAt: closedAt.toISOString() },
			reason
		});
	});
}
