// The Readiness board: for one line, people × the processes of its stations, what each person
// holds, who may run each station now and what expires soon. A fixed handful of queries whatever
// the size of the line; the "may run now" answers come from decideGate, so the board and the
// station gate agree at the same instant.
import { and, asc, eq, gt, inArray, isNull, lte } from 'drizzle-orm';
import { alias } from 'drizzle-orm/mysql-core';
import { db } from '../db';
import {
	assignments,
	certificates,
	certificationRules,
	checkAttempts,
	lines,
	people,
	processes,
	shifts,
	signoffs,
	sites,
	stationProcesses,
	stations,
	supervisedRuns
} from '../db/schema';
import { config } from '../config';
import { expiringWindowDays } from '../training/rules';
import { nextPlantMidnight } from '../gate';
import { decideGate, type GateCertificate, type GateWarningCode } from '../../gate/decide';
import { daysToExpiry, deriveCertificateStatus, isQualifying } from '../../training/status';
import type { CertificateStatus } from '../../training/vocabulary';
import type { ReadinessState } from '../../readiness';
import { localDate } from '../../time';

export interface BoardQuery {
	lineId: number;
	shiftId?: number | null;
	/** Narrows the columns (and the stations shown) to these processes. */
	processIds?: number[] | null;
	/** Narrows the rows, the lists and the expirations to agency staff; coverage still counts everyone. */
	agencyOnly?: boolean;
	now: Date;
}

export interface BoardCell {
	state: ReadinessState;
	/** The status of the certificate the state comes from, when there is one. */
	status: CertificateStatus | null;
	certificate: string | null;
	expiresAt: string | null;
	daysToExpiry: number | null;
	/** End of the grace period, for state 'grace'. */
	graceUntil: string | null;
}

export interface BoardPerson {
	id: number;
	name: string;
	employeeNo: string;
	shift: string | null;
	agency: boolean;
	agencyName: string | null;
	/** One cell per entry of `processes`, in the same order. */
	cells: BoardCell[];
}

export interface StationRunner {
	id: number;
	name: string;
	employeeNo: string;
	agency: boolean;
	supervised: boolean;
	warnings: GateWarningCode[];
	validUntil: string | null;
}

export interface StationCoverage {
	station: string;
	stationName: string;
	shift: string | null;
	minQualified: number;
	/** People of the shift the station gate would allow now. */
	count: number;
	below: boolean;
	runners: StationRunner[];
}

export interface Expiration {
	personId: number;
	name: string;
	employeeNo: string;
	shift: string | null;
	process: string;
	certificate: string;
	status: CertificateStatus;
	expiresAt: string;
	daysToExpiry: number;
}

export interface ReadinessBoard {
	generatedAt: string;
	timeZone: string;
	line: { id: number; code: string; name: string };
	shift: { id: number; code: string; name: string } | null;
	agencyOnly: boolean;
	/** Every process of the line's stations (what the process filter can pick from). */
	lineProcesses: { id: number; code: string; name: string }[];
	/** The columns: lineProcesses narrowed by the filter. */
	processes: { id: number; code: string; name: string }[];
	stations: { code: string; name: string; minQualified: number; processes: string[] }[];
	people: BoardPerson[];
	coverage: StationCoverage[];
	/** Qualifying certificates ending within 0–30, 31–60 and 61–90 days, soonest first. */
	expirations: { within30: Expiration[]; within60: Expiration[]; within90: Expiration[] };
}

type Proc = { id: number; code: string; name: string };

const key = (a: number, b: number) => `${a}:${b}`;

/** The board for one line; null when the line does not exist. */
export async function readinessBoard(q: BoardQuery): Promise<ReadinessBoard | null> {
	const { now } = q;
	const [line] = await db
		.select({ id: lines.id, code: lines.code, name: lines.name, timeZone: sites.timeZone })
		.from(lines)
		.innerJoin(sites, eq(sites.id, lines.siteId))
		.where(eq(lines.id, q.lineId));
	if (!line) return null;

	const supervisor = alias(people, 'supervisor');
	const [stationRows, crew, shiftRows] = await Promise.all([
		db
			.select({
				id: stations.id,
				code: stations.code,
				name: stations.name,
				minQualified: stations.minQualified,
				processId: processes.id,
				processCode: processes.code,
				processName: processes.name
			})
			.from(stations)
			.innerJoin(stationProcesses, eq(stationProcesses.stationId, stations.id))
			.innerJoin(processes, eq(processes.id, stationProcesses.processId))
			.where(and(eq(stations.lineId, line.id), eq(stations.active, true)))
			.orderBy(asc(stations.code), asc(processes.code)),
		db
			.select({
				id: people.id,
				name: people.displayName,
				employeeNo: people.employeeNo,
				employmentType: people.employmentType,
				agencyName: people.agencyName,
				contractEndsOn: people.contractEndsOn,
				shiftId: people.shiftId,
				timeZone: sites.timeZone
			})
			.from(people)
			.leftJoin(sites, eq(sites.id, people.siteId))
			.where(
				and(
					eq(people.lineId, line.id),
					eq(people.active, true),
					q.shiftId ? eq(people.shiftId, q.shiftId) : undefined
				)
			)
			.orderBy(asc(people.displayName), asc(people.id)),
		db
			.select({ id: shifts.id, code: shifts.code, name: shifts.name })
			.from(shifts)
			.innerJoin(lines, eq(lines.siteId, shifts.siteId))
			.where(eq(lines.id, line.id))
			.orderBy(asc(shifts.code))
	]);

	// Stations with their processes, and the line's processes in code order.
	const stationMap = new Map<
		number,
		{ id: number; code: string; name: string; minQualified: number; procs: Proc[] }
	>();
	const procMap = new Map<number, Proc>();
	for (const r of stationRows) {
		const p = { id: r.processId, code: r.processCode, name: r.processName };
		procMap.set(p.id, p);
		const s = stationMap.get(r.id) ?? {
			id: r.id,
			code: r.code,
			name: r.name,
			minQualified: r.minQualified,
			procs: []
		};
		s.procs.push(p);
		stationMap.set(r.id, s);
	}
	const lineProcesses = [...procMap.values()].sort((a, b) => a.code.localeCompare(b.code));
	const wanted = q.processIds?.length ? new Set(q.processIds) : null;
	const columns = wanted ? lineProcesses.filter((p) => wanted.has(p.id)) : lineProcesses;
	const shownStations = [...stationMap.values()].filter(
		(s) => !wanted || s.procs.some((p) => wanted.has(p.id))
	);
	const shiftById = new Map(shiftRows.map((s) => [s.id, s]));
	const chosenShift = q.shiftId ? (shiftById.get(q.shiftId) ?? null) : null;

	const personIds = crew.map((p) => p.id);
	const procIds = lineProcesses.map((p) => p.id);
	const stationIds = [...stationMap.keys()];
	const some = personIds.length > 0 && procIds.length > 0;
	const [certRows, openRows, attemptRows, signoffRows, runRows] = some
		? await Promise.all([
				db
					.select({
						personId: certificates.personId,
						processId: certificates.processId,
						number: certificates.number,
						state: certificates.state,
						expiresAt: certificates.expiresAt,
						graceUntil: certificates.graceUntil,
						reminderDays: certificationRules.reminderDays
					})
					.from(certificates)
					.innerJoin(certificationRules, eq(certificationRules.id, certificates.ruleId))
					.where(
						and(inArray(certificates.personId, personIds), inArray(certificates.processId, procIds))
					),
				db
					.selectDistinct({ personId: assignments.personId, processId: assignments.processId })
					.from(assignments)
					.where(
						and(
							inArray(assignments.personId, personIds),
							inArray(assignments.processId, procIds),
							isNull(assignments.closedAt)
						)
					),
				db
					.selectDistinct({ personId: checkAttempts.personId, processId: checkAttempts.processId })
					.from(checkAttempts)
					.where(
						and(
							inArray(checkAttempts.personId, personIds),
							inArray(checkAttempts.processId, procIds)
						)
					),
				db
					.selectDistinct({ personId: signoffs.personId, processId: signoffs.processId })
					.from(signoffs)
					.where(and(inArray(signoffs.personId, personIds), inArray(signoffs.processId, procIds))),
				db
					.select({
						id: supervisedRuns.id,
						personId: supervisedRuns.personId,
						stationId: supervisedRuns.stationId,
						endsAt: supervisedRuns.endsAt,
						supervisorName: supervisor.displayName
					})
					.from(supervisedRuns)
					.innerJoin(supervisor, eq(supervisor.id, supervisedRuns.supervisorId))
					.where(
						and(
							inArray(supervisedRuns.personId, personIds),
							inArray(supervisedRuns.stationId, stationIds),
							isNull(supervisedRuns.revokedAt),
							lte(supervisedRuns.startsAt, now),
							gt(supervisedRuns.endsAt, now)
						)
					)
			])
		: [[], [], [], [], []];

	const certs = new Map<string, GateCertificate[]>();
	for (const c of certRows) {
		const k = key(c.personId, c.processId);
		const list = certs.get(k) ?? [];
		list.push({
			processId: c.processId,
			number: c.number,
			status: deriveCertificateStatus(c, now, expiringWindowDays(c)),
			expiresAt: c.expiresAt,
			graceUntil: c.graceUntil
		});
		certs.set(k, list);
	}
	const open = new Set(openRows.map((r) => key(r.personId, r.processId)));
	const progress = new Set(
		[...attemptRows, ...signoffRows].map((r) => key(r.personId, r.processId))
	);
	const runs = new Map(runRows.map((r) => [key(r.personId, r.stationId), r]));

	const boardPeople: BoardPerson[] = [];
	const expiring: Expiration[] = [];
	const coverage = new Map<string, StationCoverage>();
	for (const s of shownStations) {
		const shiftList = chosenShift ? [chosenShift] : shiftRows;
		for (const sh of shiftList) coverage.set(key(s.id, sh.id), coverageRow(s, sh.code));
		if (!chosenShift) coverage.set(key(s.id, 0), coverageRow(s, null));
	}

	for (const p of crew) {
		const agency = p.employmentType === 'agency';
		const shiftCode = p.shiftId ? (shiftById.get(p.shiftId)?.code ?? null) : null;
		const zone = p.timeZone ?? config.plantTimeZone;
		const contractEndsAt = p.contractEndsOn ? nextPlantMidnight(p.contractEndsOn, zone) : null;
		const today = localDate(now, zone);
		for (const s of shownStations) {
			const row = coverage.get(key(s.id, p.shiftId ?? 0));
			if (!row) continue;
			const run = runs.get(key(p.id, s.id));
			const d = decideGate({
				now,
				today,
				contractEndsAt,
				station: { id: s.id, code: s.code, active: true, processes: s.procs },
				person: {
					id: p.id,
					displayName: p.name,
					employeeNo: p.employeeNo,
					active: true,
					employmentType: p.employmentType,
					contractEndsOn: p.contractEndsOn
				},
				certificates: s.procs.flatMap((pr) => certs.get(key(p.id, pr.id)) ?? []),
				supervisedRun: run
					? { id: run.id, endsAt: run.endsAt, supervisorName: run.supervisorName }
					: null
			});
			if (d.decision !== 'allow') continue;
			row.count++;
			if (!q.agencyOnly || agency)
				row.runners.push({
					id: p.id,
					name: p.name,
					employeeNo: p.employeeNo,
					agency,
					supervised: d.reasons.some((r) => r.code === 'supervised'),
					warnings: d.warnings.map((w) => w.code),
					validUntil: d.validUntil?.toISOString() ?? null
				});
		}
		if (q.agencyOnly && !agency) continue;
		const cells = columns.map((proc) => {
			const k = key(p.id, proc.id);
			const cell = cellFor(certs.get(k) ?? [], open.has(k), progress.has(k), now);
			if (cell.certificate && cell.daysToExpiry != null && cell.daysToExpiry <= 90)
				expiring.push({
					personId: p.id,
					name: p.name,
					employeeNo: p.employeeNo,
					shift: shiftCode,
					process: proc.code,
					certificate: cell.certificate,
					status: cell.status!,
					expiresAt: cell.expiresAt!,
					daysToExpiry: cell.daysToExpiry
				});
			return cell;
		});
		boardPeople.push({
			id: p.id,
			name: p.name,
			employeeNo: p.employeeNo,
			shift: shiftCode,
			agency,
			agencyName: p.agencyName,
			cells
		});
	}
	for (const row of coverage.values())
		row.below = row.shift !== null && row.count < row.minQualified;
	expiring.sort((a, b) => a.expiresAt.localeCompare(b.expiresAt) || a.name.localeCompare(b.name));

	return {
		generatedAt: now.toISOString(),
		timeZone: line.timeZone,
		line: { id: line.id, code: line.code, name: line.name },
		shift: chosenShift,
		agencyOnly: !!q.agencyOnly,
		lineProcesses,
		processes: columns,
		stations: shownStations.map((s) => ({
			code: s.code,
			name: s.name,
			minQualified: s.minQualified,
			processes: s.procs.map((p) => p.code)
		})),
		people: boardPeople,
		// People without a shift are listed (who can run) but never flagged: no minimum applies.
		coverage: [...coverage.values()].filter((c) => c.shift !== null || c.runners.length > 0),
		expirations: {
			within30: expiring.filter((e) => e.daysToExpiry <= 30),
			within60: expiring.filter((e) => e.daysToExpiry > 30 && e.daysToExpiry <= 60),
			within90: expiring.filter((e) => e.daysToExpiry > 60)
		}
	};
}

function coverageRow(
	s: { code: string; name: string; minQualified: number },
	shift: string | null
): StationCoverage {
	return {
		station: s.code,
		stationName: s.name,
		shift,
		minQualified: s.minQualified,
		count: 0,
		below: false,
		runners: []
	};
}

const DENY_FIRST: CertificateStatus[] = ['suspended', 'withdrawn', 'retraining_overdue', 'expired'];

/**
 * One cell. A qualifying certificate (the one lasting longest, as the gate picks it) decides
 * certified / expiring / grace. Without one: suspended or withdrawn shows as suspended; an open
 * assignment shows in training; so does a started check or sign-off when the person never held a
 * certificate for the process; then expired (or retraining overdue); else none.
 */
export function cellFor(
	list: GateCertificate[],
	assigned: boolean,
	started: boolean,
	now: Date
): BoardCell {
	const good = list
		.filter((c) => isQualifying(c.status))
		.sort((a, b) => b.expiresAt.getTime() - a.expiresAt.getTime())[0];
	const empty = {
		certificate: null,
		expiresAt: null,
		daysToExpiry: null,
		graceUntil: null
	};
	if (good) {
		const state: ReadinessState =
			good.status === 'valid' ? 'certified' : good.status === 'expiring' ? 'expiring' : 'grace';
		return {
			state,
			status: good.status,
			certificate: good.number,
			expiresAt: good.expiresAt.toISOString(),
			daysToExpiry: daysToExpiry(good.expiresAt, now),
			graceUntil: state === 'grace' ? (good.graceUntil?.toISOString() ?? null) : null
		};
	}
	const worst = DENY_FIRST.map((s) => list.find((c) => c.status === s)).find(Boolean);
	if (worst && (worst.status === 'suspended' || worst.status === 'withdrawn'))
		return { state: 'suspended', status: worst.status, ...empty, certificate: worst.number };
	const everHeld = list.length > 0;
	if (assigned || (started && !everHeld))
		return { state: 'in_training', status: worst?.status ?? null, ...empty };
	if (worst)
		return {
			state: 'expired',
			status: worst.status,
			...empty,
			certificate: worst.number,
			expiresAt: worst.expiresAt.toISOString()
		};
	return { state: 'none', status: null, ...empty };
}

/** The board's line by code within a site, for the API (lines are unique per site). */
export async function findLine(code: string, siteId: number | null) {
	const [l] = await db
		.select({ id: lines.id, code: lines.code })
		.from(lines)
		.where(and(eq(lines.code, code), siteId ? eq(lines.siteId, siteId) : undefined));
	return l ?? null;
}

/** Shift ids by code and process ids by code, for turning a query string into a BoardQuery. */
export async function resolveCodes(
	lineId: number,
	shiftCode: string | null,
	processCodes: string[]
) {
	const [shift] = shiftCode
		? await db
				.select({ id: shifts.id })
				.from(shifts)
				.innerJoin(lines, eq(lines.siteId, shifts.siteId))
				.where(and(eq(lines.id, lineId), eq(shifts.code, shiftCode)))
		: [];
	const procs = processCodes.length
		? await db
				.select({ id: processes.id, code: processes.code })
				.from(processes)
				.where(inArray(processes.code, processCodes))
		: [];
	return {
		shiftId: shift?.id ?? null,
		processIds: procs.map((p) => p.id),
		unknownProcesses: processCodes.filter((c) => !procs.some((p) => p.code === c))
	};
}

/** What the page's filters offer: the lines in the viewer's reach and the site's shifts. */
export async function readinessChoices(
	lineRows: { id: number; code: string; name: string }[],
	siteId: number | null
) {
	const shiftRows = await db
		.select({ code: shifts.code, name: shifts.name })
		.from(shifts)
		.where(siteId ? eq(shifts.siteId, siteId) : undefined)
		.orderBy(asc(shifts.code));
	return {
		lines: lineRows.map((l) => ({ code: l.code, name: l.name })),
		shifts: [...new Map(shiftRows.map((s) => [s.code, s])).values()]
	};
}
