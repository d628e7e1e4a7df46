import { and, asc, eq, inArray, or, sql } from 'drizzle-orm';
import { db, type Tx } from '../db';
import { lines, processes, stationProcesses, stations } from '../db/schema';
import { recordAudit, type Actor } from '../audit';
import { changedValues } from '../audit/diff';
import { stationCodeLine } from '../../plant';
import type { StationInput } from '../../schemas/plant';
import { PlantRuleError, resolveSiteId, uniqueCode } from './common';
import { processFields } from './processes';

const processCodes = sql<
	string | null
>`(select group_concat(${processes.code} order by ${processes.code} separator ',') from ${stationProcesses} join ${processes} on ${processes.id} = ${stationProcesses.processId} where ${stationProcesses.stationId} = ${stations.id})`;

/** The site's stations with their line and the codes of the processes each requires. */
export async function listStations(siteId: number | null) {
	const site = await resolveSiteId(siteId);
	const rows = await db
		.select({
			id: stations.id,
			code: stations.code,
			name: stations.name,
			line: lines.code,
			lineActive: lines.active,
			minQualified: stations.minQualified,
			active: stations.active,
			processes: processCodes
		})
		.from(stations)
		.innerJoin(lines, eq(lines.id, stations.lineId))
		.where(eq(lines.siteId, site))
		.orderBy(asc(stations.code));
	return rows.map((r) => ({ ...r, processes: (r.processes ?? '').split(',').filter(Boolean) }));
}

/** One station of the admin's site with the ids of the processes it requires, or null. */
export async function getStation(id: number, siteId: number | null) {
	const site = await resolveSiteId(siteId);
	const [row] = await db
		.select({
			id: stations.id,
			code: stations.code,
			name: stations.name,
			lineId: stations.lineId,
			minQualified: stations.minQualified,
			active: stations.active
		})
		.from(stations)
		.innerJoin(lines, eq(lines.id, stations.lineId))
		.where(and(eq(stations.id, id), eq(lines.siteId, site)));
	if (!row) return null;
	const links = await db
		.select({ id: stationProcesses.processId })
		.from(stationProcesses)
		.where(eq(stationProcesses.stationId, id));
	return { ...row, processIds: links.map((l) => l.id).sort((a, b) => a - b) };
}

/**
 * Lines and processes the station form offers: the active ones, plus whatever the station
 * already uses, so editing never silently drops a deactivated line or process.
 */
export async function stationFormChoices(
	siteId: number | null,
	current?: { lineId: number; processIds: number[] }
) {
	const site = await resolveSiteId(siteId);
	const [l, p] = await Promise.all([
		db
			.select({ id: lines.id, code: lines.code, name: lines.name, active: lines.active })
			.from(lines)
			.where(
				and(
					eq(lines.siteId, site),
					current
						? or(eq(lines.active, true), eq(lines.id, current.lineId))
						: eq(lines.active, true)
				)
			)
			.orderBy(asc(lines.code)),
		db
			.select(processFields)
			.from(processes)
			.where(
				current?.processIds.length
					? or(eq(processes.active, true), inArray(processes.id, current.processIds))
					: eq(processes.active, true)
			)
			.orderBy(asc(processes.code))
	]);
	return { lines: l, processes: p };
}

interface StationBefore {
	code: string;
	lineId: number;
	processIds: number[];
}

/** The plant's rules for a station, checked inside the writing transaction. */
async function checkStation(tx: Tx, site: number, input: StationInput, old?: StationBefore) {
	const [line] = await tx
		.select({ id: lines.id, code: lines.code, active: lines.active })
		.from(lines)
		.where(and(eq(lines.id, input.lineId), eq(lines.siteId, site)));
	if (!line) throw new PlantRuleError('lineId', "Choose one of this plant's lines");
	if (!line.active && line.id !== old?.lineId)
		throw new PlantRuleError('lineId', `Line ${line.code} is deactivated`);
	const renamedOrMoved = !old || old.code !== input.code || old.lineId !== input.lineId;
	if (renamedOrMoved && stationCodeLine(input.code) !== line.code) {
		throw new PlantRuleError(
			'code',
			`Stations on line ${line.code} have codes starting ${line.code}-, e.g. ${line.code}-FOG-01`
		);
	}
	const ids = [...new Set(input.processIds)];
	const found = await tx
		.select({ id: processes.id, code: processes.code, active: processes.active })
		.from(processes)
		.where(inArray(processes.id, ids))
		.orderBy(asc(processes.code));
	if (found.length !== ids.length)
		throw new PlantRuleError('processIds', 'One of the chosen processes no longer exists');
	const newlyInactive = found.filter((p) => !p.active && !old?.processIds.includes(p.id));
	if (newlyInactive.length) {
		throw new PlantRuleError(
			'processIds',
			`Deactivated, cannot be added: ${newlyInactive.map((p) => p.code).join(', ')}`
		);
	}
	return { line, processes: found };
}

const taken = (code: string) => `Station ${code} already exists`;

/** Adds a station with the processes it requires, audited in the same transaction. */
export async function createStation(actor: Actor, input: StationInput, siteId: number | null) {
	const site = await resolveSiteId(siteId);
	return uniqueCode(
		() =>
			db.transaction(async (tx) => {
				const checked = await checkStation(tx, site, input);
				const values = {
					lineId: checked.line.id,
					code: input.code,
					name: input.name,
					minQualified: input.minQualified
				};
				const [{ id }] = await tx.insert(stations).values(values).$returningId();
				await tx
					.insert(stationProcesses)
					.values(checked.processes.map((p) => ({ stationId: id, processId: p.id })));
				await recordAudit(tx, actor, {
					action: 'station.create',
					entityType: 'station',
					entityId: id,
					newValues: {
						...values,
						line: checked.line.code,
						active: true,
						processes: checked.processes.map((p) => p.code)
					}
				});
				return id;
			}),
		taken(input.code)
	);
}

/** Saves a station and its required processes; the audit event lists old and new process codes. */
export async function updateStation(
	actor: Actor,
	id: number,
	input: StationInput,
	siteId: number | null
) {
	const site = await resolveSiteId(siteId);
	return uniqueCode(
		() =>
			db.transaction(async (tx) => {
				const [old] = await tx.select().from(stations).where(eq(stations.id, id)).for('update');
				if (!old) throw new Error(`station ${id} vanished`);
				const oldLinks = await tx
					.select({ id: processes.id, code: processes.code })
					.from(stationProcesses)
					.innerJoin(processes, eq(processes.id, stationProcesses.processId))
					.where(eq(stationProcesses.stationId, id))
					.orderBy(asc(processes.code));
				const checked = await checkStation(tx, site, input, {
					code: old.code,
					lineId: old.lineId,
					processIds: oldLinks.map((p) => p.id)
				});
				const [oldLine] = await tx
					.select({ code: lines.code })
					.from(lines)
					.where(eq(lines.id, old.lineId));
				const next = {
					code: input.code,
					name: input.name,
					lineId: checked.line.id,
					minQualified: input.minQualified
				};
				const diff = changedValues(
					{ ...old, line: oldLine?.code, processes: oldLinks.map((p) => p.code) },
					{ ...next, line: checked.line.code, processes: checked.processes.map((p) => p.code) }
				);
				if (!diff.changed) return false;
				await tx.update(stations).set(next).where(eq(stations.id, id));
				const keep = new Set(checked.processes.map((p) => p.id));
				const had = new Set(oldLinks.map((p) => p.id));
				const removed = [...had].filter((p) => !keep.has(p));
				const added = [...keep].filter((p) => !had.has(p));
				if (removed.length) {
					await tx
						.delete(stationProcesses)
						.where(
							and(eq(stationProcesses.stationId, id), inArray(stationProcesses.processId, removed))
						);
				}
				if (added.length) {
					await tx
						.insert(stationProcesses)
						.values(added.map((processId) => ({ stationId: id, processId })));
				}
				await recordAudit(tx, actor, {
					action: 'station.update',
					entityType: 'station',
					entityId: id,
					oldValues: { code: old.code, ...diff.before },
					newValues: { code: input.code, ...diff.after }
				});
				return true;
			}),
		taken(input.code)
	);
}
