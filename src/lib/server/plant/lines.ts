import { and, asc, eq, sql } from 'drizzle-orm';
import { db } from '../db';
import { lines, people, stations } from '../db/schema';
import type { Actor } from '../audit';
import type { LineInput } from '../../schemas/plant';
import { createAudited, resolveSiteId, updateAudited } from './common';

/** The site's lines with how many stations and active people each has. */
export async function listLines(siteId: number | null) {
	const site = await resolveSiteId(siteId);
	const rows = await db
		.select({
			id: lines.id,
			code: lines.code,
			name: lines.name,
			active: lines.active,
			stationCount: sql<number>`(select count(*) from ${stations} where ${stations.lineId} = ${lines.id})`,
			peopleCount: sql<number>`(select count(*) from ${people} where ${people.lineId} = ${lines.id} and ${people.active})`
		})
		.from(lines)
		.where(eq(lines.siteId, site))
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
