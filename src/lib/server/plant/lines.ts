import { and, asc, countDistinct, eq } from 'drizzle-orm';
import { db } from '../db';
import { lines, people, stations } from '../db/schema';
import type { Actor } from '../audit';
import type { LineInput } from '../../schemas/plant';
import { createAudited, resolveSiteId, updateAudited } from './common';

/** The site's lines with how many stations and active people each has. */
export async function listLines(siteId: number | null) {
	const site = await resolveSiteId(siteId);
	// Joins rather than correlated subqueries: drizzle leaves the columns of a single-table select
	// unqualified, and an unqualified `id` inside a subquery binds to the subquery's own table.
	const rows = await db
		.select({
			id: lines.id,
			code: lines.code,
			name: lines.name,
			active: lines.active,
			stationCount: countDistinct(stations.id),
			peopleCount: countDistinct(people.id)
		})
		.from(lines)
		.leftJoin(stations, eq(stations.lineId, lines.id))
		.leftJoin(people, and(eq(people.lineId, lines.id), eq(people.active, true)))
		.where(eq(lines.siteId, site))
		.groupBy(lines.id)
		.orderBy(asc(lines.code));
	return rows.map((r) => ({
		...r,
		stationCount: Number(r.stationCount),
		peopleCount: Number(r.peopleCount)
	}));
}

/** One line of the admin's site, or null (another site's line is as good as missing). */
export async function getLine(id: number, siteId: number | null) {
	const site = await resolveSiteId(siteId);
	const [row] = await db
		.select({ id: lines.id, code: lines.code, name: lines.name, active: lines.active })
		.from(lines)
		.where(and(eq(lines.id, id), eq(lines.siteId, site)));
	return row ?? null;
}

const taken = (code: string) => `Line ${code} already exists in this plant`;

export async function createLine(actor: Actor, input: LineInput, siteId: number | null) {
	const site = await resolveSiteId(siteId);
	return createAudited(
		actor,
		'line',
		{ siteId: site, code: input.code, name: input.name },
		taken(input.code)
	);
}

export async function updateLine(actor: Actor, id: number, input: LineInput) {
	return updateAudited(
		actor,
		'line',
		id,
		{ code: input.code, name: input.name },
		taken(input.code)
	);
}
