// Reads of the Instructions area. Every "what is in force" question goes through
// loadEffectiveRevisions → pickEffective, with the caller's clock.
import { and, asc, eq, inArray, isNotNull, lte, or, sql } from 'drizzle-orm';
import { db, type DbOrTx } from '../db';
import {
	instructionStations,
	instructions,
	people,
	processes,
	reviewComments,
	revisionFiles,
	revisions,
	stationProcesses,
	stations
} from '../db/schema';
import type { Role } from '../../roles';
import type { DisplayStatus, RevisionState } from '../../instructions/vocabulary';
import { letterToNumber } from '../../instructions/vocabulary';
import { canSeeArchive } from './access';
import { displayStatus, nextSwitchAfter, pickEffective } from './effective';
import { notFound } from './errors';

export interface RevisionMeta {
	id: number;
	instructionId: number;
	letter: string;
	state: RevisionState;
	effectiveFrom: Date | null;
	approvedAt: Date | null;
}

const metaColumns = {
	id: revisions.id,
	instructionId: revisions.instructionId,
	letter: revisions.letter,
	state: revisions.state,
	effectiveFrom: revisions.effectiveFrom,
	approvedAt: revisions.approvedAt
};

/**
 * The effective revision of each instruction at `now` (optionally only the given instructions).
 * Instructions with nothing in force are absent from the map.
 */
export async function loadEffectiveRevisions(
	now: Date = new Date(),
	instructionIds?: number[],
	conn: DbOrTx = db
): Promise<Map<number, RevisionMeta>> {
	if (instructionIds && instructionIds.length === 0) return new Map();
	const rows = await conn
		.select({ ...metaColumns, withdrawnAt: instructions.withdrawnAt })
		.from(revisions)
		.innerJoin(instructions, eq(instructions.id, revisions.instructionId))
		.where(
			and(
				inArray(revisions.state, ['approved', 'superseded']),
				isNotNull(revisions.effectiveFrom),
				lte(revisions.effectiveFrom, now),
				instructionIds ? inArray(revisions.instructionId, instructionIds) : undefined
			)
		);
	const byInstruction = new Map<number, (typeof rows)[number][]>();
	for (const r of rows) {
		const list = byInstruction.get(r.instructionId) ?? [];
		list.push(r);
		byInstruction.set(r.instructionId, list);
	}
	const result = new Map<number, RevisionMeta>();
	for (const [instructionId, list] of byInstruction) {
		const pick = pickEffective(list, now, list[0].withdrawnAt);
		if (pick) {
			const { withdrawnAt: _w, ...meta } = pick;
			result.set(instructionId, meta);
		}
	}
	return result;
}

/** The earliest future instant at which any revision switches in (search uses it to re-index). */
export async function findNextEffectiveSwitch(now: Date = new Date()): Promise<Date | null> {
	const rows = await db
		.select({ id: revisions.id, state: revisions.state, effectiveFrom: revisions.effectiveFrom })
		.from(revisions)
		.where(and(eq(revisions.state, 'approved'), sql`${revisions.effectiveFrom} > ${now}`))
		.orderBy(asc(revisions.effectiveFrom))
		.limit(1);
	return nextSwitchAfter(rows, now);
}

export interface RegisterFilter {
	q?: string;
	process?: string;
	station?: string;
	status?: DisplayStatus | 'withdrawn' | '';
}

export interface RegisterRow {
	docNumber: string;
	title: string;
	process: string | null;
	processName: string | null;
	stations: string[];
	withdrawn: boolean;
	effective: { letter: string; effectiveFrom: Date } | null;
	scheduled: { letter: string; effectiveFrom: Date } | null;
	open: { letter: string; status: DisplayStatus } | null;
	reviewDueOn: string | null;
}

/** The register as the viewer may see it: operators see only instructions with a revision in force. */
export async function listRegister(
	roles: readonly Role[],
	filter: RegisterFilter = {},
	now: Date = new Date()
): Promise<RegisterRow[]> {
	const archive = canSeeArchive(roles);
	const rows = await db
		.select({
			id: instructions.id,
			docNumber: instructions.docNumber,
			title: instructions.title,
			process: processes.code,
			processName: processes.name,
			reviewDueOn: instructions.reviewDueOn,
			withdrawnAt: instructions.withdrawnAt
		})
		.from(instructions)
		.leftJoin(processes, eq(processes.id, instructions.processId))
		.orderBy(asc(instructions.docNumber));
	const stationsByInstruction = await loadStationCodes();
	const revs = await db.select(metaColumns).from(revisions);
	const revsByInstruction = new Map<number, RevisionMeta[]>();
	for (const r of revs) {
		const l = revsByInstruction.get(r.instructionId) ?? [];
		l.push(r);
		revsByInstruction.set(r.instructionId, l);
	}
	const out: RegisterRow[] = [];
	const q = filter.q?.trim().toLocaleLowerCase();
	for (const i of rows) {
		const list = revsByInstruction.get(i.id) ?? [];
		const withdrawn = !!i.withdrawnAt && i.withdrawnAt <= now;
		const eff = pickEffective(list, now, i.withdrawnAt);
		if (!archive && !eff) continue;
		const scheduled = list
			.filter((r) => displayStatus(r, eff?.id ?? null, now) === 'scheduled')
			.sort((a, b) => a.effectiveFrom!.getTime() - b.effectiveFrom!.getTime())[0];
		const open = list.find((r) => r.state === 'draft' || r.state === 'in_review');
		const row: RegisterRow = {
			docNumber: i.docNumber,
			title: i.title,
			process: i.process,
			processName: i.processName,
			stations: stationsByInstruction.get(i.id) ?? [],
			withdrawn,
			effective: eff ? { letter: eff.letter, effectiveFrom: eff.effectiveFrom! } : null,
			scheduled:
				archive && scheduled
					? { letter: scheduled.letter, effectiveFrom: scheduled.effectiveFrom! }
					: null,
			open:
				archive && open
					? { letter: open.letter, status: displayStatus(open, eff?.id ?? null, now) }
					: null,
			reviewDueOn: archive ? i.reviewDueOn : null
		};
		if (q && !`${row.docNumber} ${row.title}`.toLocaleLowerCase().includes(q)) continue;
		if (filter.process && row.process !== filter.process) continue;
		if (filter.station && !row.stations.includes(filter.station)) continue;
		if (filter.status) {
			const s = filter.status;
			const ok =
				(s === 'withdrawn' && withdrawn) ||
				(s === 'effective' && !!row.effective) ||
				(s === 'scheduled' && !!row.scheduled) ||
				((s === 'draft' || s === 'in_review') && row.open?.status === s);
			if (!ok) continue;
		}
		out.push(row);
	}
	return out;
}

/** Station codes per instruction: stations named on it plus stations running its process. */
async function loadStationCodes(instructionIds?: number[]): Promise<Map<number, string[]>> {
	const direct = await db
		.select({ instructionId: instructionStations.instructionId, code: stations.code })
		.from(instructionStations)
		.innerJoin(stations, eq(stations.id, instructionStations.stationId))
		.where(instructionIds ? inArray(instructionStations.instructionId, instructionIds) : undefined);
	const viaProcess = await db
		.select({ instructionId: instructions.id, code: stations.code })
		.from(instructions)
		.innerJoin(stationProcesses, eq(stationProcesses.processId, instructions.processId))
		.innerJoin(stations, eq(stations.id, stationProcesses.stationId))
		.where(instructionIds ? inArray(instructions.id, instructionIds) : undefined);
	const map = new Map<number, Set<string>>();
	for (const r of [...direct, ...viaProcess]) {
		const s = map.get(r.instructionId) ?? new Set<string>();
		s.add(r.code);
		map.set(r.instructionId, s);
	}
	return new Map([...map].map(([k, v]) => [k, [...v].sort()]));
}

/** One instruction by document number with its process and stations, or null. */
export async function findInstruction(docNumber: string) {
	const [i] = await db
		.select({
			id: instructions.id,
			docNumber: instructions.docNumber,
			title: instructions.title,
			processId: instructions.processId,
			process: processes.code,
			processName: processes.name,
			ownerId: instructions.ownerId,
			ownerName: people.displayName,
			reviewDueOn: instructions.reviewDueOn,
			withdrawnAt: instructions.withdrawnAt,
			withdrawnReason: instructions.withdrawnReason
		})
		.from(instructions)
		.leftJoin(processes, eq(processes.id, instructions.processId))
		.leftJoin(people, eq(people.id, instructions.ownerId))
		.where(eq(instructions.docNumber, docNumber));
	if (!i) return null;
	const codes = await loadStationCodes([i.id]);
	return { ...i, stations: codes.get(i.id) ?? [] };
}
export type InstructionInfo = NonNullable<Awaited<ReturnType<typeof findInstruction>>>;

/** All revisions of an instruction (no source), oldest first, each with its display status. */
export async function listRevisions(instructionId: number, now: Date = new Date()) {
	const rows = await db
		.select({
			...metaColumns,
			authorName: people.displayName,
			submittedAt: revisions.submittedAt,
			classification: revisions.classification,
			changeSummary: revisions.changeSummary
		})
		.from(revisions)
		.leftJoin(people, eq(people.id, revisions.authorId))
		.where(eq(revisions.instructionId, instructionId));
	const [inst] = await db
		.select({ withdrawnAt: instructions.withdrawnAt })
		.from(instructions)
		.where(eq(instructions.id, instructionId));
	const eff = pickEffective(rows, now, inst?.withdrawnAt ?? null);
	return rows
		.sort((a, b) => letterToNumber(a.letter) - letterToNumber(b.letter))
		.map((r) => ({ ...r, status: displayStatus(r, eff?.id ?? null, now) }));
}

/** A revision with its source, people and files. */
export async function getRevision(instructionId: number, letter: string, conn: DbOrTx = db) {
	const [r] = await conn
		.select()
		.from(revisions)
		.where(and(eq(revisions.instructionId, instructionId), eq(revisions.letter, letter)));
	if (!r) return null;
	const names = await conn
		.select({ id: people.id, displayName: people.displayName })
		.from(people)
		.where(
			inArray(
				people.id,
				[r.authorId, r.approvedBy, r.lastEditedBy].filter((x): x is number => x != null)
			)
		);
	const nameOf = (id: number | null) => names.find((n) => n.id === id)?.displayName ?? null;
	const files = await listRevisionFiles(r.id, conn);
	return {
		...r,
		authorName: nameOf(r.authorId),
		approvedByName: nameOf(r.approvedBy),
		lastEditedByName: nameOf(r.lastEditedBy),
		files
	};
}
export type RevisionDetail = NonNullable<Awaited<ReturnType<typeof getRevision>>>;

export async function listRevisionFiles(revisionId: number, conn: DbOrTx = db) {
	return conn
		.select({
			id: revisionFiles.id,
			kind: revisionFiles.kind,
			storageKey: revisionFiles.storageKey,
			originalName: revisionFiles.originalName,
			contentType: revisionFiles.contentType,
			sizeBytes: revisionFiles.sizeBytes,
			sha256: revisionFiles.sha256,
			widthPx: revisionFiles.widthPx,
			heightPx: revisionFiles.heightPx
		})
		.from(revisionFiles)
		.where(eq(revisionFiles.revisionId, revisionId))
		.orderBy(asc(revisionFiles.originalName));
}

export async function listReviewComments(revisionId: number) {
	return db
		.select({
			id: reviewComments.id,
			kind: reviewComments.kind,
			body: reviewComments.body,
			createdAt: reviewComments.createdAt,
			authorName: people.displayName
		})
		.from(reviewComments)
		.innerJoin(people, eq(people.id, reviewComments.authorId))
		.where(eq(reviewComments.revisionId, revisionId))
		.orderBy(asc(reviewComments.createdAt));
}

export interface Viewer {
	id: number;
	roles: readonly Role[];
}

/**
 * The revision `letter` of `docNumber` if this viewer may read it, with its status at `now`.
 * People outside the archive roles get 404 for anything but the effective revision, so no URL or
 * API call reveals that other revisions exist.
 */
export async function resolveRevisionForViewer(
	viewer: Viewer,
	docNumber: string,
	letter: string,
	now: Date = new Date()
) {
	const instruction = await findInstruction(docNumber);
	if (!instruction) throw notFound();
	const revision = await getRevision(instruction.id, letter);
	if (!revision) throw notFound();
	const eff = (await loadEffectiveRevisions(now, [instruction.id])).get(instruction.id) ?? null;
	const status = displayStatus(revision, eff?.id ?? null, now);
	if (!canSeeArchive(viewer.roles) && status !== 'effective') throw notFound();
	return { instruction, revision, status, effectiveLetter: eff?.letter ?? null };
}

/** The instruction and its revision in force at `now`, or 404 when nothing is in force. */
export async function resolveEffectiveForViewer(
	viewer: Viewer,
	docNumber: string,
	now: Date = new Date()
) {
	const instruction = await findInstruction(docNumber);
	if (!instruction) throw notFound();
	const eff = (await loadEffectiveRevisions(now, [instruction.id])).get(instruction.id) ?? null;
	if (!eff) {
		if (canSeeArchive(viewer.roles)) return { instruction, revision: null };
		throw notFound('No revision of this instruction is in force');
	}
	const revision = await getRevision(instruction.id, eff.letter);
	return { instruction, revision };
}

/** A station and the instructions in force for it (its own and its processes'). */
export async function listStationInstructions(code: string, now: Date = new Date()) {
	const [station] = await db
		.select({ id: stations.id, code: stations.code, name: stations.name })
		.from(stations)
		.where(eq(stations.code, code));
	if (!station) return null;
	const procRows = await db
		.select({ processId: stationProcesses.processId })
		.from(stationProcesses)
		.where(eq(stationProcesses.stationId, station.id));
	const processIds = procRows.map((p) => p.processId);
	const candidates = await db
		.selectDistinct({
			id: instructions.id,
			docNumber: instructions.docNumber,
			title: instructions.title,
			process: processes.name
		})
		.from(instructions)
		.leftJoin(processes, eq(processes.id, instructions.processId))
		.leftJoin(instructionStations, eq(instructionStations.instructionId, instructions.id))
		.where(
			or(
				eq(instructionStations.stationId, station.id),
				processIds.length ? inArray(instructions.processId, processIds) : undefined
			)
		)
		.orderBy(asc(instructions.docNumber));
	const eff = await loadEffectiveRevisions(
		now,
		candidates.map((c) => c.id)
	);
	const list = candidates
		.filter((c) => eff.has(c.id))
		.map((c) => ({
			docNumber: c.docNumber,
			title: c.title,
			process: c.process,
			letter: eff.get(c.id)!.letter,
			effectiveFrom: eff.get(c.id)!.effectiveFrom!
		}));
	return { station, instructions: list };
}

/** Processes and stations for the new-instruction form. */
export async function listInstructionChoices() {
	const procs = await db
		.select({ id: processes.id, code: processes.code, name: processes.name })
		.from(processes)
		.where(eq(processes.active, true))
		.orderBy(asc(processes.code));
	const sts = await db
		.select({ id: stations.id, code: stations.code, name: stations.name })
		.from(stations)
		.where(eq(stations.active, true))
		.orderBy(asc(stations.code));
	return { processes: procs, stations: sts };
}
