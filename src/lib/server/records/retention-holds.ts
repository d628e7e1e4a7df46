// Legal holds: while a hold is open, no retention run touches the person or their gate log rows
// (the gate log procedures check the same table). hr and admin place and release them.
import { and, desc, eq, isNotNull, isNull } from 'drizzle-orm';
import { alias } from 'drizzle-orm/mysql-core';
import { db } from '../db';
import { legalHolds, people } from '../db/schema';
import { recordAudit, type Actor } from '../audit';
import { Refusal } from '../errors';
import { formatLocal } from '../../time';

const placer = alias(people, 'hold_placer');
const releaser = alias(people, 'hold_releaser');

export interface PlaceHoldInput {
	employeeNo: string;
	reason: string;
}

/** Places a hold on the person with this employee number; one open hold per person. */
export async function placeLegalHold(
	actor: Actor & { id: number },
	input: PlaceHoldInput,
	timeZone: string,
	now: Date = new Date()
): Promise<{ holdId: number; personId: number }> {
	return db.transaction(async (tx) => {
		const [person] = await tx
			.select({ id: people.id, anonymisedAt: people.anonymisedAt })
			.from(people)
			.where(eq(people.employeeNo, input.employeeNo))
			.for('update');
		if (!person) {
			throw new Refusal(400, 'Not placed.', {
				employeeNo: 'No person has this employee number.'
			});
		}
		if (person.anonymisedAt) {
			throw new Refusal(409, 'Not placed.', {
				employeeNo: `This person was anonymised on ${formatLocal(person.anonymisedAt, timeZone)}; there is nothing left to hold.`
			});
		}
		const [open] = await tx
			.select({ id: legalHolds.id, placedAt: legalHolds.placedAt })
			.from(legalHolds)
			.where(and(eq(legalHolds.personId, person.id), isNull(legalHolds.releasedAt)));
		if (open) {
			throw new Refusal(409, 'Not placed.', {
				employeeNo: `This person is already under legal hold #${open.id} since ${formatLocal(open.placedAt, timeZone)}.`
			});
		}
		const [{ id }] = await tx
			.insert(legalHolds)
			.values({ personId: person.id, reason: input.reason, placedBy: actor.id, placedAt: now })
			.$returningId();
		await recordAudit(tx, actor, {
			action: 'legal_hold.placed',
			entityType: 'legal_hold',
			entityId: id,
			newValues: { personId: person.id, placedAt: now.toISOString() },
			reason: input.reason
		});
		return { holdId: id, personId: person.id };
	});
}

/** Releases an open hold; the next retention run treats the person like everyone else. */
export async function releaseLegalHold(
	actor: Actor & { id: number },
	input: { holdId: number; reason: string },
	timeZone: string,
	now: Date = new Date()
): Promise<void> {
	await db.transaction(async (tx) => {
		const [hold] = await tx
			.select()
			.from(legalHolds)
			.where(eq(legalHolds.id, input.holdId))
			.for('update');
		if (!hold) throw new Refusal(404, 'No such legal hold.');
		if (hold.releasedAt) {
			throw new Refusal(
				409,
				`Legal hold #${hold.id} was already released on ${formatLocal(hold.releasedAt, timeZone)}.`
			);
		}
		await tx
			.update(legalHolds)
			.set({ releasedAt: now, releasedBy: actor.id, releaseReason: input.reason })
			.where(eq(legalHolds.id, hold.id));
		await recordAudit(tx, actor, {
			action: 'legal_hold.released',
			entityType: 'legal_hold',
			entityId: hold.id,
			oldValues: { releasedAt: null },
			newValues: { personId: hold.personId, releasedAt: now.toISOString() },
			reason: input.reason
		});
	});
}

const holdColumns = {
	id: legalHolds.id,
	personId: legalHolds.personId,
	person: people.displayName,
	employeeNo: people.employeeNo,
	reason: legalHolds.reason,
	placedAt: legalHolds.placedAt,
	placedBy: placer.displayName,
	releasedAt: legalHolds.releasedAt,
	releasedBy: releaser.displayName,
	releaseReason: legalHolds.releaseReason
};

function holdQuery() {
	return db
		.select(holdColumns)
		.from(legalHolds)
		.innerJoin(people, eq(people.id, legalHolds.personId))
		.innerJoin(placer, eq(placer.id, legalHolds.placedBy))
		.leftJoin(releaser, eq(releaser.id, legalHolds.releasedBy));
}

/** Open holds, and the most recently released ones. */
export async function listLegalHolds(releasedLimit = 20) {
	const [open, released] = await Promise.all([
		holdQuery().where(isNull(legalHolds.releasedAt)).orderBy(desc(legalHolds.placedAt)),
		holdQuery()
			.where(isNotNull(legalHolds.releasedAt))
			.orderBy(desc(legalHolds.releasedAt))
			.limit(releasedLimit)
	]);
	return { open, released };
}

/** Every hold of one person, newest first (the admin person page). */
export async function legalHoldsOf(personId: number) {
	return holdQuery().where(eq(legalHolds.personId, personId)).orderBy(desc(legalHolds.placedAt));
}
