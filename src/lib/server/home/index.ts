import { and, asc, desc, eq, gte, lte, sql } from 'drizzle-orm';
import { db } from '../db';
import {
	auditEvents,
	lines,
	people,
	processes,
	shifts,
	stationProcesses,
	stations
} from '../db/schema';
import type { SessionUser } from '../auth/sessions';
import { localDate } from '../../time';
import { trainingFor, type TrainingItem } from '../training/next-steps';

/** Stations of a line with the processes each requires. */
async function stationsOfLine(lineId: number) {
	const rows = await db
		.select({ code: stations.code, name: stations.name, process: processes.name })
		.from(stations)
		.leftJoin(stationProcesses, eq(stationProcesses.stationId, stations.id))
		.leftJoin(processes, eq(processes.id, stationProcesses.processId))
		.where(and(eq(stations.lineId, lineId), eq(stations.active, true)))
		.orderBy(asc(stations.code), asc(processes.name));
	const map = new Map<string, { code: string; name: string; processes: string[] }>();
	for (const r of rows) {
		const s = map.get(r.code) ?? { code: r.code, name: r.name, processes: [] };
		if (r.process) s.processes.push(r.process);
		map.set(r.code, s);
	}
	return [...map.values()];
}

/** What the home screen shows, section by section, for the roles this person holds. */
export async function homeFor(user: SessionUser) {
	const [me] = await db
		.select({
			lineId: people.lineId,
			line: lines.code,
			lineName: lines.name,
			shift: shifts.name,
			shiftCode: shifts.code,
			badgeNo: people.badgeNo,
			employeeNo: people.employeeNo
		})
		.from(people)
		.leftJoin(lines, eq(lines.id, people.lineId))
		.leftJoin(shifts, eq(shifts.id, people.shiftId))
		.where(eq(people.id, user.id));

	const result: {
		me: typeof me;
		myStations?: Awaited<ReturnType<typeof stationsOfLine>>;
		crew?: { name: string; shift: string | null; agency: boolean; contractEndsOn: string | null }[];
		counts?: { activePeople: number; inactivePeople: number; stations: number; processes: number };
		recentAudit?: {
			seq: number;
			at: Date;
			actorLabel: string;
			action: string;
			entityType: string;
			entityId: string | null;
		}[];
		headcount?: { employmentType: string; n: number }[];
		contractsEnding?: { name: string; employeeNo: string; contractEndsOn: string | null }[];
		training?: TrainingItem[];
	} = { me };

	const has = (r: string) => user.roles.includes(r as never);

	if ((has('operator') || has('trainer')) && me?.lineId) {
		result.myStations = await stationsOfLine(me.lineId);
	}
	if (has('operator') || has('trainer')) {
		result.training = await trainingFor(user.id, localDate(new Date(), user.timeZone));
	}
	if (has('lead') && me?.lineId) {
		result.crew = (
			await db
				.select({
					name: people.displayName,
					shift: shifts.code,
					employmentType: people.employmentType,
					contractEndsOn: people.contractEndsOn
				})
				.from(people)
				.leftJoin(shifts, eq(shifts.id, people.shiftId))
				.where(and(eq(people.lineId, me.lineId), eq(people.active, true)))
				.orderBy(asc(shifts.code), asc(people.displayName))
		).map((r) => ({ ...r, agency: r.employmentType === 'agency' }));
	}
	if (has('admin')) {
		const [c] = await db
			.select({
				activePeople: sql<number>`sum(${people.active} = 1)`,
				inactivePeople: sql<number>`sum(${people.active} = 0)`
			})
			.from(people);
		const [s] = await db.select({ n: sql<number>`count(*)` }).from(stations);
		const [p] = await db.select({ n: sql<number>`count(*)` }).from(processes);
		result.counts = {
			activePeople: Number(c.activePeople ?? 0),
			inactivePeople: Number(c.inactivePeople ?? 0),
			stations: Number(s.n),
			processes: Number(p.n)
		};
	}
	if (has('quality') || has('admin')) {
		result.recentAudit = await db
			.select({
				seq: auditEvents.seq,
				at: auditEvents.at,
				actorLabel: auditEvents.actorLabel,
				action: auditEvents.action,
				entityType: auditEvents.entityType,
				entityId: auditEvents.entityId
			})
			.from(auditEvents)
			.orderBy(desc(auditEvents.seq))
			.limit(8);
	}
	if (has('hr')) {
		result.headcount = (
			await db
				.select({ employmentType: people.employmentType, n: sql<number>`count(*)` })
				.from(people)
				.where(eq(people.active, true))
				.groupBy(people.employmentType)
		).map((r) => ({ ...r, n: Number(r.n) }));
		const today = localDate(new Date(), user.timeZone);
		const in45 = localDate(new Date(Date.now() + 45 * 86_400_000), user.timeZone);
		result.contractsEnding = await db
			.select({
				name: people.displayName,
				employeeNo: people.employeeNo,
				contractEndsOn: people.contractEndsOn
			})
			.from(people)
			.where(
				and(
					eq(people.active, true),
					gte(people.contractEndsOn, today),
					lte(people.contractEndsOn, in45)
				)
			)
			.orderBy(asc(people.contractEndsOn));
	}
	return result;
}
