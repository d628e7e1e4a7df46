import { and, asc, count, eq } from 'drizzle-orm';
import { db } from '../db';
import { people, shifts } from '../db/schema';
import type { Actor } from '../audit';
import type { ShiftInput } from '../../schemas/plant';
import { createAudited, resolveSiteId, updateAudited } from './common';

const shiftFields = {
	id: shifts.id,
	code: shifts.code,
	name: shifts.name,
	startsAt: shifts.startsAt,
	endsAt: shifts.endsAt
};

/** The site's shifts (local wall-clock times) with how many active people work each. */
export async function listShifts(siteId: number | null) {
	const site = await resolveSiteId(siteId);
	const rows = await db
		.select({
			...shiftFields,
			peopleCount: count(people.id)
		})
		.from(shifts)
		.leftJoin(people, and(eq(people.shiftId, shifts.id), eq(people.active, true)))
		.where(eq(shifts.siteId, site))
		.groupBy(shifts.id)
		.orderBy(asc(shifts.startsAt));
	return rows.map((r) => ({ ...r, peopleCount: Number(r.peopleCount) }));
}

export async function getShift(id: number, siteId: number | null) {
	const site = await resolveSiteId(siteId);
	const [row] = await db
		.select(shiftFields)
		.from(shifts)
		.where(and(eq(shifts.id, id), eq(shifts.siteId, site)));
	return row ?? null;
}

const taken = (code: string) => `Shift ${code} already exists in this plant`;
const fields = (i: ShiftInput) => ({
	code: i.code,
	name: i.name,
	startsAt: i.startsAt,
	endsAt: i.endsAt
});

export async function createShift(actor: Actor, input: ShiftInput, siteId: number | null) {
	const site = await resolveSiteId(siteId);
	return createAudited(actor, 'shift', { siteId: site, ...fields(input) }, taken(input.code));
}

export async function updateShift(actor: Actor, id: number, input: ShiftInput) {
	return updateAudited(actor, 'shift', id, fields(input), taken(input.code));
}
