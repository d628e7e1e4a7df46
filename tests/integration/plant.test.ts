// The plant's server functions against the real MariaDB: every change audited in the same
// transaction, duplicates refused as ConflictError, nothing deleted.
import { and, count, desc, eq, gt, like } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { db, pool } from '../../src/lib/server/db';
import {
	auditChain,
	auditEvents,
	lines,
	people,
	processes,
	shifts,
	stationProcesses,
	stations
} from '../../src/lib/server/db/schema';
import { verifyAuditChain, type Actor } from '../../src/lib/server/audit';
import {
	ConflictError,
	PlantRuleError,
	createLine,
	createProcess,
	createShift,
	createStation,
	getStation,
	listLines,
	listProcesses,
	listShifts,
	listStations,
	plantMap,
	setPlantActive,
	stationFormChoices,
	updateLine,
	updateProcess,
	updateShift,
	updateStation
} from '../../src/lib/server/plant';

// Codes unique to this run, so the shared demo data stays as it is and reruns do not collide.
const RUN = Date.now().toString(36).slice(-5).toUpperCase();
const LINE = `T${RUN}`;
let actor: Actor;
let siteId: number;

async function lastAudit(entityType: string, entityId: number) {
	const [row] = await db
		.select()
		.from(auditEvents)
		.where(and(eq(auditEvents.entityType, entityType), eq(auditEvents.entityId, String(entityId))))
		.orderBy(desc(auditEvents.seq))
		.limit(1);
	return row;
}

async function auditCount() {
	const [{ n }] = await db.select({ n: count() }).from(auditEvents);
	return n;
}

beforeAll(async () => {
	const [admin] = await db
		.select({ id: people.id, name: people.displayName, siteId: people.siteId })
		.from(people)
		.where(eq(people.email, 'admin@kbo2.example'));
	actor = { id: admin.id, label: admin.name, address: '127.0.0.1' };
	siteId = admin.siteId!;
});

afterAll(async () => {
	// Out of the way of other tests: the test line stays only as history.
	const [line] = await db.select({ id: lines.id }).from(lines).where(eq(lines.code, LINE));
	if (line) await setPlantActive(actor, 'line', line.id, false, 'plant test finished');
	const mine = await db
		.select({ id: processes.id })
		.from(processes)
		.where(like(processes.code, `%-${RUN}`));
	for (const p of mine) await setPlantActive(actor, 'process', p.id, false, 'plant test finished');
	await pool.end();
});

describe('lines', () => {
	it('creates, updates and deactivates a line, auditing each change with old and new values', async () => {
		const id = await createLine(actor, { code: LINE, name: 'Test line · COF' }, siteId);
		const [row] = await db.select().from(lines).where(eq(lines.id, id));
		expect(row).toMatchObject({ code: LINE, name: 'Test line · COF', active: true, siteId });
		const created = await lastAudit('line', id);
		expect(created.action).toBe('line.create');
		expect(created.actorId).toBe(actor.id);
		expect(created.newValues).toMatchObject({ code: LINE, name: 'Test line · COF', active: true });

		expect(await updateLine(actor, id, { code: LINE, name: 'Test line · COF + FOB' })).toBe(true);
		const updated = await lastAudit('line', id);
		expect(updated.action).toBe('line.update');
		expect(updated.oldValues).toEqual({ code: LINE, name: 'Test line · COF' });
		expect(updated.newValues).toEqual({ code: LINE, name: 'Test line · COF + FOB' });

		// Saving the same values again is no change and leaves no audit event.
		const before = await auditCount();
		expect(await updateLine(actor, id, { code: LINE, name: 'Test line · COF + FOB' })).toBe(false);
		expect(await auditCount()).toBe(before);

		await setPlantActive(actor, 'line', id, false, 'line moved to another hall');
		const [off] = await db.select().from(lines).where(eq(lines.id, id));
		expect(off.active).toBe(false);
		const deact = await lastAudit('line', id);
		expect(deact).toMatchObject({
			action: 'line.deactivate',
			reason: 'line moved to another hall',
			oldValues: { code: LINE, active: true },
			newValues: { code: LINE, active: false }
		});
		await setPlantActive(actor, 'line', id, true, 'back in use');
		expect((await lastAudit('line', id)).action).toBe('line.reactivate');
	});

	it('counts each line’s stations and active people', async () => {
		const listed = await listLines(siteId);
		expect(listed.length).toBeGreaterThanOrEqual(2);
		for (const l of listed) {
			const [s] = await db.select({ n: count() }).from(stations).where(eq(stations.lineId, l.id));
			const [p] = await db
				.select({ n: count() })
				.from(people)
				.where(and(eq(people.lineId, l.id), eq(people.active, true)));
			expect([l.code, l.stationCount, l.peopleCount]).toEqual([l.code, s.n, p.n]);
		}
		// The demo plant has people on both lines, so a count of zero everywhere would be a bug.
		expect(listed.filter((l) => l.peopleCount > 0).length).toBeGreaterThanOrEqual(2);
	});

	it('refuses a second line with the same code in the site as a ConflictError on code', async () => {
		const err = await createLine(actor, { code: LINE, name: 'Copy' }, siteId).catch((e) => e);
		expect(err).toBeInstanceOf(ConflictError);
		expect(err.field).toBe('code');
		expect(err.message).toContain(LINE);
	});
});

describe('shifts', () => {
	it('keeps local wall-clock times, also across midnight, and audits the change', async () => {
		const code = `N${RUN}`;
		const id = await createShift(
			actor,
			{ code, name: 'Test night', startsAt: '22:30', endsAt: '06:30' },
			siteId
		);
		const [row] = await db.select().from(shifts).where(eq(shifts.id, id));
		expect(row).toMatchObject({ startsAt: '22:30', endsAt: '06:30' });
		await updateShift(actor, id, { code, name: 'Test night', startsAt: '22:00', endsAt: '06:00' });
		const ev = await lastAudit('shift', id);
		expect(ev.action).toBe('shift.update');
		expect(ev.oldValues).toEqual({ code, startsAt: '22:30', endsAt: '06:30' });
		expect(ev.newValues).toEqual({ code, startsAt: '22:00', endsAt: '06:00' });
		const dup = await createShift(
			actor,
			{ code, name: 'x', startsAt: '06:00', endsAt: '14:00' },
			siteId
		).catch((e) => e);
		expect(dup).toBeInstanceOf(ConflictError);
		// Shifts cannot be deactivated; nobody works this one, so the test removes it again.
		await db.delete(shifts).where(eq(shifts.id, id));
	});

	it('counts each shift’s active people', async () => {
		for (const s of await listShifts(siteId)) {
			const [p] = await db
				.select({ n: count() })
				.from(people)
				.where(and(eq(people.shiftId, s.id), eq(people.active, true)));
			expect([s.code, s.peopleCount]).toEqual([s.code, p.n]);
		}
	});
});

describe('processes and stations', () => {
	let lineId: number;
	let pLam: number;
	let pBond: number;
	let pInsp: number;

	beforeAll(async () => {
		[{ id: lineId }] = await db
			.select({ id: lines.id })
			.from(lines)
			.where(and(eq(lines.code, LINE), eq(lines.siteId, siteId)));
		pLam = await createProcess(actor, {
			code: `LAM-${RUN}`,
			name: 'Test ACF lamination',
			bondType: 'ACF'
		});
		pBond = await createProcess(actor, {
			code: `COF-${RUN}`,
			name: 'Test COF bond',
			bondType: 'COF'
		});
		pInsp = await createProcess(actor, {
			code: `INS-${RUN}`,
			name: 'Test inspection',
			bondType: 'INSP'
		});
	});

	it('audits a process change and refuses a duplicate process code', async () => {
		await updateProcess(actor, pBond, {
			code: `COF-${RUN}`,
			name: 'Test COF main bond',
			bondType: 'COF'
		});
		const ev = await lastAudit('process', pBond);
		expect(ev.oldValues).toEqual({ code: `COF-${RUN}`, name: 'Test COF bond' });
		expect(ev.newValues).toEqual({ code: `COF-${RUN}`, name: 'Test COF main bond' });
		const dup = await createProcess(actor, {
			code: `COF-${RUN}`,
			name: 'again',
			bondType: 'COF'
		}).catch((e) => e);
		expect(dup).toBeInstanceOf(ConflictError);
		expect(dup.field).toBe('code');
	});

	it('saves the processes a station requires and lists them with the station', async () => {
		const code = `${LINE}-COF-01`;
		const id = await createStation(
			actor,
			{ code, lineId, name: 'Test COF bonder', minQualified: 3, processIds: [pBond, pLam, pLam] },
			siteId
		);
		const links = await db
			.select({ p: stationProcesses.processId })
			.from(stationProcesses)
			.where(eq(stationProcesses.stationId, id));
		expect(links.map((l) => l.p).sort((a, b) => a - b)).toEqual(
			[pLam, pBond].sort((a, b) => a - b)
		);
		const ev = await lastAudit('station', id);
		expect(ev.action).toBe('station.create');
		expect(ev.newValues).toMatchObject({
			code,
			line: LINE,
			minQualified: 3,
			processes: [`COF-${RUN}`, `LAM-${RUN}`]
		});
		const listed = (await listStations(siteId)).find((s) => s.id === id);
		expect(listed?.processes).toEqual([`COF-${RUN}`, `LAM-${RUN}`]);
		const counts = await listProcesses();
		expect(counts.find((p) => p.id === pBond)?.stationCount).toBe(1);
		expect(counts.find((p) => p.id === pInsp)?.stationCount).toBe(0);
		const map = await plantMap(siteId);
		const onMap = map.lines.find((l) => l.id === lineId)?.stations.find((s) => s.id === id);
		// The map orders processes as work flows: lamination (ACF) before bonding (COF).
		expect(onMap?.processes.map((p) => p.code)).toEqual([`LAM-${RUN}`, `COF-${RUN}`]);
	});

	it('replaces a station’s processes and records old and new process codes', async () => {
		const station = (await listStations(siteId)).find((s) => s.code === `${LINE}-COF-01`)!;
		const changed = await updateStation(
			actor,
			station.id,
			{
				code: station.code,
				lineId,
				name: 'Test COF bonder',
				minQualified: 2,
				processIds: [pBond, pInsp]
			},
			siteId
		);
		expect(changed).toBe(true);
		expect((await getStation(station.id, siteId))?.processIds).toEqual(
			[pBond, pInsp].sort((a, b) => a - b)
		);
		const ev = await lastAudit('station', station.id);
		expect(ev.action).toBe('station.update');
		expect(ev.oldValues).toEqual({
			code: station.code,
			minQualified: 3,
			processes: [`COF-${RUN}`, `LAM-${RUN}`]
		});
		expect(ev.newValues).toEqual({
			code: station.code,
			minQualified: 2,
			processes: [`COF-${RUN}`, `INS-${RUN}`]
		});
	});

	it('refuses a station code of another line, a duplicate code and a deactivated process', async () => {
		const wrongLine = await createStation(
			actor,
			{ code: 'L1-COF-88', lineId, name: 'x', minQualified: 2, processIds: [pBond] },
			siteId
		).catch((e) => e);
		expect(wrongLine).toBeInstanceOf(PlantRuleError);
		expect(wrongLine.field).toBe('code');

		const dup = await createStation(
			actor,
			{ code: `${LINE}-COF-01`, lineId, name: 'x', minQualified: 2, processIds: [pBond] },
			siteId
		).catch((e) => e);
		expect(dup).toBeInstanceOf(ConflictError);

		await setPlantActive(actor, 'process', pLam, false, 'replaced by a new lamination process');
		const inactive = await createStation(
			actor,
			{ code: `${LINE}-COF-02`, lineId, name: 'x', minQualified: 2, processIds: [pLam] },
			siteId
		).catch((e) => e);
		expect(inactive).toBeInstanceOf(PlantRuleError);
		expect(inactive.field).toBe('processIds');
		expect(
			await db
				.select()
				.from(stations)
				.where(eq(stations.code, `${LINE}-COF-02`))
		).toEqual([]);
		// The form no longer offers it for a new station.
		const choices = await stationFormChoices(siteId);
		expect(choices.processes.some((p) => p.id === pLam)).toBe(false);
	});

	it('deactivates a station instead of deleting it', async () => {
		const station = (await listStations(siteId)).find((s) => s.code === `${LINE}-COF-01`)!;
		await setPlantActive(actor, 'station', station.id, false, 'bonder sent for overhaul');
		const after = await getStation(station.id, siteId);
		expect(after?.active).toBe(false);
		expect(after?.processIds.length).toBe(2);
		expect((await lastAudit('station', station.id)).reason).toBe('bonder sent for overhaul');
	});

	it('rolls back the change when its audit event cannot be written', async () => {
		// An actor label longer than the audit column makes the audit insert fail after the
		// change itself has been written in the transaction: both must disappear together.
		const broken: Actor = { ...actor, label: 'x'.repeat(300) };
		const [headBefore] = await db.select().from(auditChain);
		const eventsBefore = await auditCount();

		await expect(
			createLine(broken, { code: `R${RUN}`, name: 'never saved' }, siteId)
		).rejects.toThrow();
		expect(
			await db
				.select()
				.from(lines)
				.where(eq(lines.code, `R${RUN}`))
		).toEqual([]);

		const station = (await listStations(siteId)).find((s) => s.code === `${LINE}-COF-01`)!;
		await expect(
			updateStation(
				broken,
				station.id,
				{
					code: station.code,
					lineId,
					name: 'renamed, but not for long',
					minQualified: 5,
					processIds: [pInsp]
				},
				siteId
			)
		).rejects.toThrow();
		const unchanged = await getStation(station.id, siteId);
		expect(unchanged?.name).toBe('Test COF bonder');
		expect(unchanged?.minQualified).toBe(2);
		expect(unchanged?.processIds).toEqual([pBond, pInsp].sort((a, b) => a - b));

		await expect(
			setPlantActive(broken, 'process', pBond, false, 'will not stick')
		).rejects.toThrow();
		const [p] = await db.select().from(processes).where(eq(processes.id, pBond));
		expect(p.active).toBe(true);

		expect(await auditCount()).toBe(eventsBefore);
		expect(await db.select().from(auditChain)).toEqual([headBefore]);
		const newer = await db
			.select()
			.from(auditEvents)
			.where(gt(auditEvents.seq, headBefore.lastSeq));
		expect(newer).toEqual([]);
	});

	it('leaves the audit chain intact', async () => {
		const result = await verifyAuditChain();
		expect(result.problems).toEqual([]);
		expect(result.ok).toBe(true);
	});
});
