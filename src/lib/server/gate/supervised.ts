// Supervised runs: a line lead lets a person who is not (yet) qualified run one station for at
// most one shift, with a qualified supervisor beside them. The gate allows with reason
// `supervised` from the grant until the end instant (exclusive), or until the run is revoked.
import { and, desc, eq, gt, inArray, isNull } from 'drizzle-orm';
import { alias } from 'drizzle-orm/mysql-core';
import { db } from '../db';
import { lines, people, shifts, stations, supervisedRuns } from '../db/schema';
import { recordAudit, type Actor } from '../audit';
import { Refusal } from '../errors';
import { queueSupervisedRunMail } from '../mail/events';
import type { SessionUser } from '../auth/sessions';
import type { Role } from '../../roles';
import { formatLocal, localDate, zonedToUtc } from '../../time';
import { describeGateReason } from '../../gate/describe';
import { evaluateStationAccess } from './index';
import { faultPoint } from '../faults';

/** Roles that may grant anywhere in the plant; a lead without one of them only on their line. */
const PLANT_WIDE: Role[] = ['quality', 'admin'];
export const SUPERVISED_RUN_ROLES: Role[] = ['lead', 'quality', 'admin'];
/** When the person's shift is unknown, a run may last at most this long. */
export const FALLBACK_RUN_LIMIT_MS = 12 * 3_600_000;
const RECENT_MS = 7 * 86_400_000;

type Granter = Pick<SessionUser, 'id' | 'roles' | 'siteId' | 'timeZone'>;

export interface GrantInput {
	personId: number;
	stationId: number;
	supervisorId: number;
	reason: string;
	until: Date;
}

/** The line a granter is limited to, or null when they may grant anywhere in their site. */
async function lineLimit(user: Granter): Promise<{ restricted: boolean; lineId: number | null }> {
	if (user.roles.some((r) => PLANT_WIDE.includes(r))) return { restricted: false, lineId: null };
	const [me] = await db
		.select({ lineId: people.lineId })
		.from(people)
		.where(eq(people.id, user.id));
	return { restricted: true, lineId: me?.lineId ?? null };
}

/** The next instant after `now` whose wall-clock time in `zone` is `hhmm` (today or tomorrow). */
export function untilFromWallClock(hhmm: string, zone: string, now: Date = new Date()): Date {
	const today = localDate(now, zone);
	const t = zonedToUtc(today, hhmm, zone);
	if (t.getTime() > now.getTime()) return t;
	const d = new Date(`${today}T00:00:00Z`);
	d.setUTCDate(d.getUTCDate() + 1);
	return zonedToUtc(d.toISOString().slice(0, 10), hhmm, zone);
}

const minutesOf = (hhmm: string) => {
	const [h, m] = hhmm.split(':').map(Number);
	return h * 60 + m;
};

/**
 * How long one shift of this person lasts: the wall-clock length of their shift (a shift that ends
 * after midnight wraps), or FALLBACK_RUN_LIMIT_MS when they have no shift. Wall-clock minutes, so
 * on a DST change night the limit is one hour off; the plant zone of the demo has no DST.
 */
export async function shiftLimitFor(personId: number) {
	const [row] = await db
		.select({ code: shifts.code, startsAt: shifts.startsAt, endsAt: shifts.endsAt })
		.from(people)
		.innerJoin(shifts, eq(shifts.id, people.shiftId))
		.where(eq(people.id, personId));
	if (!row) return { ms: FALLBACK_RUN_LIMIT_MS, label: 'no shift on record: 12 h' };
	let minutes = (minutesOf(row.endsAt) - minutesOf(row.startsAt) + 1440) % 1440;
	if (minutes === 0) minutes = 1440;
	const h = Math.floor(minutes / 60);
	const m = minutes % 60;
	return {
		ms: minutes * 60_000,
		label: `shift ${row.code}, ${row.startsAt}–${row.endsAt}: ${h} h${m ? ` ${m} min` : ''}`
	};
}

const refuse = (field: keyof GrantInput, message: string, status: 400 | 403 | 409 = 400) =>
	new Refusal(status, message, { [field]: message });

/**
 * Grants a supervised run from `now` until `input.until`. Refused (with the field at fault) when
 * the station is outside the granter's line, the end is not in the future or longer than one
 * shift, the supervisor is the person or not qualified for the station right now, or the person
 * already has an active run there. Audited, and the mail to person and supervisor is queued in the
 * same transaction.
 */
export async function grantSupervisedRun(
	actor: Actor,
	granter: Granter,
	input: GrantInput,
	now: Date = new Date()
): Promise<{ id: number; endsAt: Date }> {
	const reason = input.reason.trim();
	if (!reason) throw refuse('reason', 'Say why the run is needed.');
	const [station] = await db
		.select({
			id: stations.id,
			code: stations.code,
			active: stations.active,
			lineId: stations.lineId,
			line: lines.code
		})
		.from(stations)
		.innerJoin(lines, eq(lines.id, stations.lineId))
		.where(eq(stations.id, input.stationId));
	if (!station?.active) throw refuse('stationId', 'Choose an active station.');
	const limit = await lineLimit(granter);
	if (limit.restricted && station.lineId !== limit.lineId) {
		throw refuse(
			'stationId',
			`${station.code} is on line ${station.line}; a line lead grants runs on their own line only.`,
			403
		);
	}
	const who = await db
		.select({ id: people.id, name: people.displayName, active: people.active })
		.from(people)
		.where(inArray(people.id, [input.personId, input.supervisorId]));
	const person = who.find((p) => p.id === input.personId);
	const supervisor = who.find((p) => p.id === input.supervisorId);
	if (!person?.active) throw refuse('personId', 'Choose an active person.');
	if (!supervisor?.active) throw refuse('supervisorId', 'Choose an active supervisor.');
	if (supervisor.id === person.id)
		throw refuse('supervisorId', 'The supervisor must be someone other than the person.');

	if (input.until.getTime() <= now.getTime())
		throw refuse('until', 'The end must be in the future.');
	const shift = await shiftLimitFor(person.id);
	if (input.until.getTime() - now.getTime() > shift.ms) {
		throw refuse(
			'until',
			`A supervised run lasts at most one shift (${shift.label}); ` +
				`${formatLocal(input.until, granter.timeZone, false)} is later than that.`
		);
	}

	const check = await evaluateStationAccess(station.code, supervisor.id, now);
	if (check.decision !== 'allow' || check.reasons.some((r) => r.code === 'supervised')) {
		const why = check.reasons
			.filter((r) => r.code !== 'supervised')
			.map((r) => describeGateReason(r, granter.timeZone))
			.join('; ');
		throw refuse(
			'supervisorId',
			`${supervisor.name} is not qualified for ${station.code} right now${why ? ` (${why})` : ''}.`
		);
	}

	return db.transaction(async (tx) => {
		// Lock the person's runs at this station so two grants cannot overlap.
		const [open] = await tx
			.select({ id: supervisedRuns.id, endsAt: supervisedRuns.endsAt })
			.from(supervisedRuns)
			.where(
				and(
					eq(supervisedRuns.personId, person.id),
					eq(supervisedRuns.stationId, station.id),
					isNull(supervisedRuns.revokedAt),
					gt(supervisedRuns.endsAt, now)
				)
			)
			.for('update');
		if (open) {
			throw refuse(
				'personId',
				`${person.name} already has a supervised run at ${station.code} until ` +
					`${formatLocal(open.endsAt, granter.timeZone, false)}; end it first.`,
				409
			);
		}
		const [{ id }] = await tx
			.insert(supervisedRuns)
			.values({
				personId: person.id,
				stationId: station.id,
				supervisorId: supervisor.id,
				grantedBy: granter.id,
				reason,
				startsAt: now,
				endsAt: input.until,
				createdAt: now
			})
			.$returningId();
		await faultPoint('grant-supervised-run');
		await recordAudit(tx, actor, {
			action: 'supervised_run.granted',
			entityType: 'supervised_run',
			entityId: id,
			newValues: {
				personId: person.id,
				person: person.name,
				station: station.code,
				supervisorId: supervisor.id,
				supervisor: supervisor.name,
				startsAt: now.toISOString(),
				endsAt: input.until.toISOString()
			},
			reason
		});
		await queueSupervisedRunMail(tx, { supervisedRunId: id, now });
		return { id, endsAt: input.until };
	});
}

/** Ends a run at once (the gate stops allowing on the next check). Audited with the reason. */
export async function revokeSupervisedRun(
	actor: Actor,
	granter: Granter,
	runId: number,
	reason: string,
	now: Date = new Date()
): Promise<void> {
	const why = reason.trim();
	if (!why) throw new Refusal(400, 'Say why the run ends early.', { reason: 'Say why.' });
	const limit = await lineLimit(granter);
	await db.transaction(async (tx) => {
		const [run] = await tx
			.select({
				id: supervisedRuns.id,
				endsAt: supervisedRuns.endsAt,
				revokedAt: supervisedRuns.revokedAt,
				lineId: stations.lineId
			})
			.from(supervisedRuns)
			.innerJoin(stations, eq(stations.id, supervisedRuns.stationId))
			.where(eq(supervisedRuns.id, runId))
			.for('update');
		// A run outside the lead's line is answered like a missing one.
		if (!run || (limit.restricted && run.lineId !== limit.lineId))
			throw new Refusal(404, 'There is no such supervised run.');
		if (run.revokedAt || run.endsAt.getTime() <= now.getTime())
			throw new Refusal(409, 'This run has already ended.');
		await tx
			.update(supervisedRuns)
			.set({ revokedAt: now, revokedBy: granter.id, revokeReason: why })
			.where(eq(supervisedRuns.id, runId));
		await recordAudit(tx, actor, {
			action: 'supervised_run.revoked',
			entityType: 'supervised_run',
			entityId: runId,
			oldValues: { endsAt: run.endsAt.toISOString(), revokedAt: null },
			newValues: { endsAt: run.endsAt.toISOString(), revokedAt: now.toISOString() },
			reason: why
		});
	});
}

/** What the grant form offers: stations in reach, and the active people of the site. */
export async function supervisedRunChoices(user: Granter) {
	const limit = await lineLimit(user);
	const stationRows =
		limit.restricted && limit.lineId == null
			? []
			: await db
					.select({ id: stations.id, code: stations.code, name: stations.name })
					.from(stations)
					.innerJoin(lines, eq(lines.id, stations.lineId))
					.where(
						and(
							eq(stations.active, true),
							limit.restricted ? eq(stations.lineId, limit.lineId!) : undefined,
							user.siteId ? eq(lines.siteId, user.siteId) : undefined
						)
					)
					.orderBy(stations.code);
	const peopleRows = await db
		.select({ id: people.id, name: people.displayName, employeeNo: people.employeeNo })
		.from(people)
		.where(and(eq(people.active, true), user.siteId ? eq(people.siteId, user.siteId) : undefined))
		.orderBy(people.displayName);
	return { stations: stationRows, people: peopleRows };
}

export type RunState = 'active' | 'ended' | 'revoked' | 'scheduled';

/** Runs in reach that are active or ended within the last seven days, newest first. */
export async function listSupervisedRuns(user: Granter, now: Date = new Date()) {
	const limit = await lineLimit(user);
	if (limit.restricted && limit.lineId == null) return [];
	const person = alias(people, 'sr_person');
	const supervisor = alias(people, 'sr_supervisor');
	const granter = alias(people, 'sr_granter');
	const rows = await db
		.select({
			id: supervisedRuns.id,
			person: person.displayName,
			station: stations.code,
			supervisor: supervisor.displayName,
			grantedBy: granter.displayName,
			reason: supervisedRuns.reason,
			startsAt: supervisedRuns.startsAt,
			endsAt: supervisedRuns.endsAt,
			revokedAt: supervisedRuns.revokedAt,
			revokeReason: supervisedRuns.revokeReason
		})
		.from(supervisedRuns)
		.innerJoin(person, eq(person.id, supervisedRuns.personId))
		.innerJoin(supervisor, eq(supervisor.id, supervisedRuns.supervisorId))
		.innerJoin(granter, eq(granter.id, supervisedRuns.grantedBy))
		.innerJoin(stations, eq(stations.id, supervisedRuns.stationId))
		.where(
			and(
				gt(supervisedRuns.endsAt, new Date(now.getTime() - RECENT_MS)),
				limit.restricted ? eq(stations.lineId, limit.lineId!) : undefined
			)
		)
		.orderBy(desc(supervisedRuns.startsAt), desc(supervisedRuns.id))
		.limit(200);
	return rows.map((r) => ({
		...r,
		state: (r.revokedAt
			? 'revoked'
			: r.endsAt.getTime() <= now.getTime()
				? 'ended'
				: r.startsAt.getTime() > now.getTime()
					? 'scheduled'
					: 'active') as RunState
	}));
}
