// Leavers and rehires. Employment ends when an admin deactivates a person (that plant day) or when
// an agency contract runs out (at the end of its last day in the plant's zone, applied by the
// `contract-ends` job); either way the person is inactive, the last day is kept for retention, and
// every session ends. A rehire brings back the same identity with its whole history.
import { and, eq, isNotNull, isNull, lt } from 'drizzle-orm';
import { db, type Tx } from '../db';
import { authSessions, people } from '../db/schema';
import { recordAudit, type Actor } from '../audit';
import { Refusal } from '../errors';
import { addMonthsToDate, siteZoneOf } from '../certificates/issue';
import { hasContractEnded } from '../../employment';
import { localDate } from '../../time';
import { loadSiteZones } from './zones';
import type { RehireInput } from '../../schemas/people';

type PersonRow = typeof people.$inferSelect;

const affected = (res: unknown) => (res as [{ affectedRows: number }])[0].affectedRows;

/** A rehire's contract may run at most this far ahead (years). */
const MAX_CONTRACT_YEARS = 10;

async function lockPerson(tx: Tx, id: number): Promise<PersonRow> {
	const [row] = await tx.select().from(people).where(eq(people.id, id)).for('update');
	if (!row) throw new Refusal(404, 'No such person.');
	return row;
}

/** Inside `tx`: inactive, the last day kept, the session version moved on, open sessions ended. */
async function endEmployment(tx: Tx, old: PersonRow, endedOn: string, now: Date): Promise<number> {
	await tx
		.update(people)
		.set({ active: false, employmentEndedOn: endedOn, sessionVersion: old.sessionVersion + 1 })
		.where(eq(people.id, old.id));
	const res = await tx
		.update(authSessions)
		.set({ revokedAt: now })
		.where(and(eq(authSessions.personId, old.id), isNull(authSessions.revokedAt)));
	return affected(res);
}

/**
 * An admin ends a person's employment today (plant date), or on the contract's last day when that
 * has already passed. Ends every open session at once.
 */
export async function deactivatePerson(
	actor: Actor,
	id: number,
	reason: string,
	now: Date = new Date()
): Promise<void> {
	await db.transaction(async (tx) => {
		const old = await lockPerson(tx, id);
		if (!old.active) return;
		const today = localDate(now, await siteZoneOf(id, tx));
		const endedOn = old.contractEndsOn && old.contractEndsOn < today ? old.contractEndsOn : today;
		const sessionsEnded = await endEmployment(tx, old, endedOn, now);
		await recordAudit(tx, actor, {
			action: 'person.deactivate',
			entityType: 'person',
			entityId: id,
			oldValues: { active: true, employmentEndedOn: old.employmentEndedOn },
			newValues: { active: false, employmentEndedOn: endedOn, sessionsEnded },
			reason
		});
	});
}

/**
 * The scheduled job: everyone still active whose contract's last day has passed in their site's
 * zone is deactivated, with that day as the end of employment. Idempotent.
 */
export async function endExpiredContracts(
	now: Date = new Date()
): Promise<{ deactivated: number }> {
	const zones = await loadSiteZones(db);
	// The furthest-ahead plant date bounds the candidates; each is then judged in its own zone.
	const latestToday = zones.latestToday(now);
	const candidates = await db
		.select({ id: people.id, siteId: people.siteId, contractEndsOn: people.contractEndsOn })
		.from(people)
		.where(
			and(
				eq(people.active, true),
				isNotNull(people.contractEndsOn),
				lt(people.contractEndsOn, latestToday)
			)
		);
	let deactivated = 0;
	for (const c of candidates) {
		const zone = zones.zoneOf(c.siteId);
		if (!hasContractEnded(c.contractEndsOn, zone, now)) continue;
		const done = await db.transaction(async (tx) => {
			const old = await lockPerson(tx, c.id);
			if (!old.active || !old.contractEndsOn || !hasContractEnded(old.contractEndsOn, zone, now))
				return false;
			const sessionsEnded = await endEmployment(tx, old, old.contractEndsOn, now);
			await recordAudit(tx, null, {
				action: 'person.contract_ended',
				entityType: 'person',
				entityId: old.id,
				oldValues: { active: true, employmentEndedOn: old.employmentEndedOn },
				newValues: {
					active: false,
					employmentEndedOn: old.contractEndsOn,
					contractEndsOn: old.contractEndsOn,
					sessionsEnded
				},
				reason: `contract ended at the end of ${old.contractEndsOn} (${zone})`
			});
			return true;
		});
		if (done) deactivated++;
	}
	return { deactivated };
}

/**
 * Rehires a person who left: the same row, employee number and history, active again, with a new
 * contract end when given. Agency staff always need the new contract's last day; an employee's
 * contract end that has passed is cleared. An anonymised person cannot come back.
 */
export async function rehirePerson(
	actor: Actor,
	id: number,
	input: RehireInput,
	now: Date = new Date()
): Promise<void> {
	await db.transaction(async (tx) => {
		const old = await lockPerson(tx, id);
		if (old.anonymisedAt) {
			throw new Refusal(
				409,
				'This person was anonymised by the retention run: their name and identifiers are gone, so the records cannot be tied to anyone again. Add the person anew (their old employee number, badge and e-mail address stay retired).'
			);
		}
		if (old.active) throw new Refusal(409, 'This person is already active.');
		const today = localDate(now, await siteZoneOf(id, tx));
		if (input.contractEndsOn && input.contractEndsOn < today) {
			throw new Refusal(400, 'Not rehired.', {
				contractEndsOn: `That day has passed (today is ${today} at the plant). Give the new contract's last day.`
			});
		}
		const latest = addMonthsToDate(today, 12 * MAX_CONTRACT_YEARS);
		if (input.contractEndsOn && input.contractEndsOn > latest) {
			throw new Refusal(400, 'Not rehired.', {
				contractEndsOn: `At most ${MAX_CONTRACT_YEARS} years ahead (up to ${latest}).`
			});
		}
		// An agency rehire is a new contract, so it needs its own last day.
		if (old.employmentType === 'agency' && !input.contractEndsOn) {
			throw new Refusal(400, 'Not rehired.', {
				contractEndsOn: 'Agency staff need the new contract’s last day.'
			});
		}
		let contractEndsOn = input.contractEndsOn ?? old.contractEndsOn;
		if (!input.contractEndsOn && contractEndsOn && contractEndsOn < today) contractEndsOn = null;
		await tx
			.update(people)
			.set({
				active: true,
				employmentEndedOn: null,
				contractEndsOn,
				sessionVersion: old.sessionVersion + 1
			})
			.where(eq(people.id, id));
		await recordAudit(tx, actor, {
			action: 'person.rehired',
			entityType: 'person',
			entityId: id,
			oldValues: {
				active: false,
				employmentEndedOn: old.employmentEndedOn,
				contractEndsOn: old.contractEndsOn
			},
			newValues: { active: true, employmentEndedOn: null, contractEndsOn },
			reason: input.reason
		});
	});
}
