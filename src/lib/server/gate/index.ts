// The station gate: may this badge run this station now? Loads what decideGate needs in a few
// queries under a short timeout. Whenever the database cannot answer in time the answer is deny
// with reason `unavailable`: the gate fails closed, and recovers by itself with the pool.
import { and, eq, gt, isNull, lte } from 'drizzle-orm';
import { alias } from 'drizzle-orm/mysql-core';
import { db } from '../db';
import {
	certificates,
	certificationRules,
	gateChecks,
	people,
	processes,
	sites,
	stationProcesses,
	stations,
	supervisedRuns
} from '../db/schema';
import { config } from '../config';
import { expiringWindowDays } from '../training/rules';
import { deriveCertificateStatus } from '../../training/status';
import {
	decideGate,
	type GateDecision,
	type GateReason,
	type GateWarning
} from '../../gate/decide';
import { localDate, zonedToUtc } from '../../time';

export interface GateRequest {
	station: string;
	badge: string;
	source: 'api' | 'kiosk';
	apiKeyId?: number | null;
	/** A station-bound key may only ask for its own station: anything else is refused, unlogged. */
	keyStationId?: number | null;
}

export interface GateAnswer extends GateDecision {
	station: string;
	person: { name: string; employeeNo: string } | null;
	checkedAt: Date;
	/** The gate log row, when it could be written. */
	logId: number | null;
	/** Set when a station-bound key asked for another station (no decision was made). */
	wrongStation?: true;
	/** Set when the API key given to checkStationAccess was not valid (no decision was made). */
	unauthorized?: true;
}

export class GateTimeout extends Error {}

/** Resolves with `work`, or rejects with GateTimeout after `ms`. */
export function withTimeout<T>(work: PromiseLike<T>, ms: number): Promise<T> {
	let timer: NodeJS.Timeout;
	const timeout = new Promise<never>((_, reject) => {
		timer = setTimeout(() => reject(new GateTimeout(`no answer within ${ms} ms`)), ms);
	});
	// Drizzle queries are lazy thenables that run on every then(): settle them exactly once here,
	// or the catch below and the race would each run the query (and log a gate check twice).
	const once = Promise.resolve(work);
	once.catch(() => {}); // a late failure after the timeout is not anyone's business
	return Promise.race([once, timeout]).finally(() => clearTimeout(timer));
}

/** The station's id and active flag by code (for key binding checks), under the gate timeout. */
export async function findStationByCode(code: string) {
	const [s] = await withTimeout(
		db
			.select({ id: stations.id, code: stations.code, active: stations.active })
			.from(stations)
			.where(eq(stations.code, code)),
		config.gateTimeoutMs
	);
	return s ?? null;
}

/** Who is asking: a badge as scanned, or (for checks made by Padbridge itself) a person's id. */
type Subject = { station: string; badge?: string; personId?: number };

/**
 * Everything a decision needs, in one round of four queries run side by side: the station with
 * its processes, the person, the person's certificates for the station's processes, and a
 * supervised run in force (the last two join on the badge and the station code themselves, so
 * none waits for another).
 */
async function loadAndDecide(req: Subject, now: Date) {
	const supervisor = alias(people, 'supervisor');
	const who =
		req.badge !== undefined ? eq(people.badgeNo, req.badge) : eq(people.id, req.personId ?? -1);
	const [stationRows, [personRow], certs, [run]] = await Promise.all([
		db
			.select({
				id: stations.id,
				code: stations.code,
				active: stations.active,
				processId: processes.id,
				processCode: processes.code,
				processName: processes.name
			})
			.from(stations)
			.leftJoin(stationProcesses, eq(stationProcesses.stationId, stations.id))
			.leftJoin(processes, eq(processes.id, stationProcesses.processId))
			.where(eq(stations.code, req.station)),
		db
			.select({
				id: people.id,
				displayName: people.displayName,
				employeeNo: people.employeeNo,
				active: people.active,
				employmentType: people.employmentType,
				contractEndsOn: people.contractEndsOn,
				timeZone: sites.timeZone
			})
			.from(people)
			.leftJoin(sites, eq(sites.id, people.siteId))
			.where(who),
		db
			.select({
				processId: certificates.processId,
				number: certificates.number,
				state: certificates.state,
				expiresAt: certificates.expiresAt,
				graceUntil: certificates.graceUntil,
				reminderDays: certificationRules.reminderDays
			})
			.from(certificates)
			.innerJoin(people, and(eq(people.id, certificates.personId), who))
			.innerJoin(certificationRules, eq(certificationRules.id, certificates.ruleId))
			.innerJoin(stationProcesses, eq(stationProcesses.processId, certificates.processId))
			.innerJoin(
				stations,
				and(eq(stations.id, stationProcesses.stationId), eq(stations.code, req.station))
			),
		db
			.select({
				id: supervisedRuns.id,
				endsAt: supervisedRuns.endsAt,
				supervisorName: supervisor.displayName
			})
			.from(supervisedRuns)
			.innerJoin(people, and(eq(people.id, supervisedRuns.personId), who))
			.innerJoin(
				stations,
				and(eq(stations.id, supervisedRuns.stationId), eq(stations.code, req.station))
			)
			.innerJoin(supervisor, eq(supervisor.id, supervisedRuns.supervisorId))
			.where(
				and(
					isNull(supervisedRuns.revokedAt),
					lte(supervisedRuns.startsAt, now),
					gt(supervisedRuns.endsAt, now)
				)
			)
			.limit(1)
	]);
	const stationRow = stationRows[0]
		? { id: stationRows[0].id, code: stationRows[0].code, active: stationRows[0].active }
		: null;
	const procs = stationRows
		.filter((r) => r.processId != null)
		.map((r) => ({ id: r.processId!, code: r.processCode!, name: r.processName! }));
	const zone = personRow?.timeZone ?? config.plantTimeZone;
	// A contract ends at the end of its last day: 00:00 of the next plant day.
	const contractEndsAt = personRow?.contractEndsOn
		? nextPlantMidnight(personRow.contractEndsOn, zone)
		: null;
	const decision = decideGate({
		now,
		today: localDate(now, zone),
		contractEndsAt,
		station: stationRow ? { ...stationRow, processes: procs } : null,
		person: personRow ?? null,
		certificates: certs.map((c) => ({
			processId: c.processId,
			number: c.number,
			status: deriveCertificateStatus(c, now, expiringWindowDays(c)),
			expiresAt: c.expiresAt,
			graceUntil: c.graceUntil
		})),
		supervisedRun: run ?? null
	});
	return { decision, stationId: stationRow?.id ?? null, person: personRow ?? null };
}

/**
 * The gate's decision for a person (by id) at a station, without logging it: for checks Padbridge
 * makes itself, such as whether a supervisor is qualified. Throws when the database cannot answer.
 */
export async function evaluateStationAccess(
	stationCode: string,
	personId: number,
	now: Date = new Date()
): Promise<GateDecision> {
	const r = await withTimeout(
		loadAndDecide({ station: stationCode, personId }, now),
		config.gateTimeoutMs
	);
	return r.decision;
}

/** 00:00 in the plant's zone on the day after `date`. */
export function nextPlantMidnight(date: string, zone: string): Date {
	const d = new Date(`${date}T00:00:00Z`);
	d.setUTCDate(d.getUTCDate() + 1);
	return zonedToUtc(d.toISOString().slice(0, 10), '00:00', zone);
}

// Decisions that could not be logged because the database was away; written with the next log.
const unlogged: (typeof gateChecks.$inferInsert)[] = [];
const UNLOGGED_MAX = 10_000;

async function logDecision(row: typeof gateChecks.$inferInsert): Promise<number | null> {
	try {
		const [{ id }] = await withTimeout(
			db.insert(gateChecks).values(row).$returningId(),
			config.gateTimeoutMs
		);
		if (unlogged.length) {
			const backlog = unlogged.splice(0);
			await db
				.insert(gateChecks)
				.values(backlog)
				.catch(() => unlogged.unshift(...backlog.slice(0, UNLOGGED_MAX)));
		}
		return id;
	} catch {
		if (unlogged.length < UNLOGGED_MAX) unlogged.push(row);
		return null;
	}
}

/** Logs a deny `unavailable` decided before a check could start (the key could not be verified). */
export function recordUnavailable(req: GateRequest, now: Date = new Date()) {
	void logDecision({
		at: now,
		stationId: null,
		stationCode: req.station.slice(0, 64),
		badge: req.badge.slice(0, 64),
		personId: null,
		decision: 'deny',
		reasons: [{ code: 'unavailable' }],
		warnings: [],
		source: req.source,
		apiKeyId: req.apiKeyId ?? null,
		latencyMs: 0
	});
}

/** Decisions waiting to be logged (the database was unavailable when they were made). */
export const unloggedGateDecisions = () => unlogged.length;

/** Decides and logs one gate check. Never throws: any failure is a deny with a reason. */
/**
 * Decides and logs one gate check. Never throws: any failure is a deny with a reason. With
 * `keyCheck` (the caller's API key being verified) the key lookup runs beside the decision's own
 * queries in the same round trip; an unknown key gets `unauthorized` and nothing is logged.
 */
export async function checkStationAccess(
	req: GateRequest,
	now: Date = new Date(),
	keyCheck?: PromiseLike<{ id: number; stationId: number | null } | null>
): Promise<GateAnswer> {
	const started = performance.now();
	let decision: GateDecision;
	let stationId: number | null = null;
	let person: { id: number; displayName: string; employeeNo: string } | null = null;
	const refused = (flag: 'wrongStation' | 'unauthorized'): GateAnswer => ({
		decision: 'deny',
		reasons: [],
		warnings: [],
		validUntil: null,
		station: req.station,
		person: null,
		checkedAt: now,
		logId: null,
		[flag]: true
	});
	try {
		const [r, key] = await withTimeout(
			Promise.all([loadAndDecide(req, now), keyCheck ?? null]),
			config.gateTimeoutMs
		);
		if (keyCheck) {
			if (!key) return refused('unauthorized');
			req = { ...req, apiKeyId: key.id, keyStationId: key.stationId };
		}
		if (req.keyStationId != null && r.stationId !== req.keyStationId) {
			return refused('wrongStation');
		}
		decision = r.decision;
		stationId = r.stationId;
		person = r.person;
	} catch {
		decision = {
			decision: 'deny',
			reasons: [{ code: 'unavailable', detail: 'Padbridge could not reach its database in time.' }],
			warnings: [],
			validUntil: null
		};
	}
	const latencyMs = Math.round(performance.now() - started);
	const logId = await logDecision({
		at: now,
		stationId,
		stationCode: req.station.slice(0, 64),
		badge: req.badge.slice(0, 64),
		personId: person?.id ?? null,
		decision: decision.decision,
		reasons: decision.reasons as GateReason[],
		warnings: decision.warnings as GateWarning[],
		source: req.source,
		apiKeyId: req.apiKeyId ?? null,
		latencyMs
	});
	return {
		...decision,
		station: req.station,
		person:
			person && decision.reasons[0]?.code !== 'inactive_person'
				? { name: person.displayName, employeeNo: person.employeeNo }
				: null,
		checkedAt: now,
		logId
	};
}
