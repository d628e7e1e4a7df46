import { asc, eq } from 'drizzle-orm';
import { db } from '../db';
import { lines, processes, sites, stationProcesses, stations } from '../db/schema';
import { BOND_TYPES, type BondType } from '../../plant';
import { resolveSiteId } from './common';
import { processFields } from './processes';
import { listShifts } from './shifts';

export interface MapProcess {
	id: number;
	code: string;
	name: string;
	bondType: BondType;
	active: boolean;
}

/** Lines → stations → required processes for the plant overview, plus the shifts. */
export async function plantMap(siteId: number | null) {
	const site = await resolveSiteId(siteId);
	const [[site_], lineRows, stationRows, links, shiftRows, processRows] = await Promise.all([
		db
			.select({ code: sites.code, name: sites.name, timeZone: sites.timeZone })
			.from(sites)
			.where(eq(sites.id, site)),
		db
			.select({ id: lines.id, code: lines.code, name: lines.name, active: lines.active })
			.from(lines)
			.where(eq(lines.siteId, site))
			.orderBy(asc(lines.code)),
		db
			.select({
				id: stations.id,
				lineId: stations.lineId,
				code: stations.code,
				name: stations.name,
				minQualified: stations.minQualified,
				active: stations.active
			})
			.from(stations)
			.innerJoin(lines, eq(lines.id, stations.lineId))
			.where(eq(lines.siteId, site))
			.orderBy(asc(stations.code)),
		db
			.select({ stationId: stationProcesses.stationId, ...processFields })
			.from(stationProcesses)
			.innerJoin(processes, eq(processes.id, stationProcesses.processId))
			.innerJoin(stations, eq(stations.id, stationProcesses.stationId))
			.innerJoin(lines, eq(lines.id, stations.lineId))
			.where(eq(lines.siteId, site))
			.orderBy(asc(processes.code)),
		listShifts(site),
		db.select({ id: processes.id, code: processes.code, active: processes.active }).from(processes)
	]);
	// In the order work flows: lamination, bonding, inspection, then general topics such as ESD.
	const flow = (p: MapProcess) => BOND_TYPES.indexOf(p.bondType);
	links.sort((a, b) => flow(a) - flow(b) || a.code.localeCompare(b.code));
	const byStation = new Map<number, MapProcess[]>();
	for (const { stationId, ...p } of links) {
		byStation.set(stationId, [...(byStation.get(stationId) ?? []), p]);
	}
	const used = new Set(links.map((l) => l.code));
	return {
		site: site_,
		lines: lineRows.map((l) => ({
			...l,
			stations: stationRows
				.filter((s) => s.lineId === l.id)
				.map(({ lineId: _lineId, ...s }) => ({ ...s, processes: byStation.get(s.id) ?? [] }))
		})),
		shifts: shiftRows,
		unusedProcesses: processRows.filter((p) => p.active && !used.has(p.code)).map((p) => p.code)
	};
}
