// The plant zone each person's dates are judged in: their site's, or the first site's when they
// have none (as certificates/issue.ts siteZoneOf does).
import { asc } from 'drizzle-orm';
import type { DbOrTx } from '../db';
import { sites } from '../db/schema';
import { localDate } from '../../time';

export interface SiteZones {
	zoneOf(siteId: number | null): string;
	/** The plant date at `at` for a person of this site. */
	todayOf(siteId: number | null, at: Date): string;
	/** The furthest-ahead plant date of any site at `at`: an upper bound for date queries. */
	latestToday(at: Date): string;
}

export async function loadSiteZones(conn: DbOrTx): Promise<SiteZones> {
	const rows = await conn
		.select({ id: sites.id, timeZone: sites.timeZone })
		.from(sites)
		.orderBy(asc(sites.id));
	const fallback = rows[0]?.timeZone ?? 'UTC';
	const zoneOf = (siteId: number | null) => rows.find((z) => z.id === siteId)?.timeZone ?? fallback;
	return {
		zoneOf,
		todayOf: (siteId, at) => localDate(at, zoneOf(siteId)),
		latestToday: (at) =>
			[fallback, ...rows.map((z) => z.timeZone)]
				.map((z) => localDate(at, z))
				.sort()
				.at(-1)!
	};
}
