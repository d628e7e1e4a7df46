// Assignments: a line or station expands to one row per active person, skipping inactive people
// and open assignments; a lead assigns on their own line only; every change is audited with it.
import type { ResultSetHeader } from 'mysql2/promise';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import {
	appDb,
	closeDbHelpers,
	createTestPerson,
	queryRows,
	retireTestPeople,
	type TestPerson
} from '../helpers/db';
import { makeProcess } from '../helpers/training-fixtures';
import { signInWithPassword } from '../helpers/http-session';
import {
	assignProcess,
	closeAssignment,
	listOpenAssignments
} from '../../src/lib/server/training/assignments';
import { crewProgress } from '../../src/lib/server/training/crew';
import { pool } from '../../src/lib/server/db';
import type { Actor } from '../../src/lib/server/audit';
import type { Role } from '../../src/lib/roles';

const ZONE = 'Asia/Ho_Chi_Minh';
const RUN = Date.now().toString(36).slice(-5).toUpperCase();
let siteId: number;
let lineId: number;
let stationId: number;
let quality: TestPerson;
let lead: TestPerson;
let crew: TestPerson[];
let inactive: TestPerson;

const viewer = (p: TestPerson) => ({
	id: p.id,
	roles: p.roles as Role[],
	siteId,
	timeZone: ZONE
});
const actorOf = (p: TestPerson): Actor => ({ id: p.id, label: p.displayName, address: null });

async function insert(sql: string, params: unknown[]) {
	const [res] = await appDb().query<ResultSetHeader>(sql, params);
	return res.insertId;
}
const moveTo = (p: TestPerson, line: number) =>
	appDb().query('UPDATE people SET line_id = ? WHERE id = ?', [line, p.id]);

const assignmentsOf = (processId: number) =>
	queryRows<{
		id: number;
		person_id: number;
		scope: string;
		line_id: number;
		station_id: number | null;
	}>(
		appDb(),
		'SELECT id, person_id, scope, line_id, station_id FROM assignments WHERE process_id = ? AND closed_at IS NULL ORDER BY person_id',
		[processId]
	);
async function auditCount(action: string) {
	const [r] = await queryRows<{ n: number }>(
		appDb(),
		'SELECT COUNT(*) AS n FROM audit_events WHERE action = ?',
		[action]
	);
	return Number(r.n);
}

beforeAll(async () => {
	[{ id: siteId }] = await queryRows<{ id: number }>(
		appDb(),
		"SELECT id FROM sites WHERE code = 'KBO-2'"
	);
	lineId = await insert('INSERT INTO `lines` (site_id, code, name, active) VALUES (?, ?, ?, 1)', [
		siteId,
		`A${RUN}`,
		'Assignment test line'
	]);
	stationId = await insert(
		'INSERT INTO stations (line_id, code, name, min_qualified, active) VALUES (?, ?, ?, 1, 1)',
		[lineId, `A${RUN}-COG-01`, 'Assignment test bonder']
	);
	quality = await createTestPerson({ roles: ['quality'] });
	lead = await createTestPerson({ roles: ['lead'], line: 'L1' });
	crew = [];
	for (let i = 0; i < 3; i++) {
		const p = await createTestPerson({ roles: ['operator'], withEmail: false });
		await moveTo(p, lineId);
		crew.push(p);
	}
	inactive = await createTestPerson({ roles: ['operator'], withEmail: false, active: false });
	await moveTo(inactive, lineId);
});

afterAll(async () => {
	await appDb().query('UPDATE stations SET active = 0 WHERE id = ?', [stationId]);
	await appDb().query('UPDATE `lines` SET active = 0 WHERE id = ?', [lineId]);
	await retireTestPeople();
	await closeDbHelpers();
	await pool.end();
});

describe('assigning', () => {
	it('by line: one row per active person, skipping inactive people and open assignments', async () => {
		const proc = await makeProcess();
		// One of the crew already has this process open.
		const first = await assignProcess(actorOf(quality), viewer(quality), {
			processId: proc.id,
			scope: 'person',
			personId: crew[0].id,
			lineId: null,
			stationId: null,
			dueOn: ''
		});
		expect(first).toMatchObject({ assigned: 1, alreadyAssigned: 0 });

		const audits = await auditCount('assignment.created');
		const r = await assignProcess(actorOf(quality), viewer(quality), {
			processId: proc.id,
			scope: 'line',
			personId: null,
			lineId,
			stationId: null,
			dueOn: '2099-01-31'
		});
		expect(r).toMatchObject({ assigned: 2, alreadyAssigned: 1 });
		const rows = await assignmentsOf(proc.id);
		expect(rows.map((x) => x.person_id)).toEqual(crew.map((c) => c.id).sort((a, b) => a - b));
		expect(rows.some((x) => x.person_id === inactive.id)).toBe(false);
		expect(rows.filter((x) => x.scope === 'line')).toHaveLength(2);
		expect(rows.filter((x) => x.scope === 'line').every((x) => x.line_id === lineId)).toBe(true);
		// One audit event for the batch, with its count and scope.
		expect(await auditCount('assignment.created')).toBe(audits + 1);
		const [ev] = await queryRows<{ new_values: string | Record<string, unknown> }>(
			appDb(),
			"SELECT new_values FROM audit_events WHERE action = 'assignment.created' ORDER BY seq DESC LIMIT 1"
		);
		const values = typeof ev.new_values === 'string' ? JSON.parse(ev.new_values) : ev.new_values;
		expect(values).toMatchObject({
			process: proc.code,
			scope: 'line',
			count: 2,
			alreadyAssigned: 1,
			dueOn: '2099-01-31'
		});

		// Again: everybody is assigned already, so nothing is written and nothing audited.
		const again = await assignProcess(actorOf(quality), viewer(quality), {
			processId: proc.id,
			scope: 'line',
			personId: null,
			lineId,
			stationId: null,
			dueOn: ''
		});
		expect(again).toMatchObject({ assigned: 0, alreadyAssigned: 3 });
		expect(await assignmentsOf(proc.id)).toHaveLength(3);
		expect(await auditCount('assignment.created')).toBe(audits + 1);

		// Each assignment queued one message in the same transaction, keyed by the assignment.
		const queued = await queryRows<{ dedupe_key: string }>(
			appDb(),
			"SELECT dedupe_key FROM mail_outbox WHERE kind = 'assignment' AND dedupe_key IN (?)",
			[(await assignmentsOf(proc.id)).map((a) => `assignment:assignment:${a.id}`)]
		);
		expect(queued).toHaveLength(3);
	});

	it('by station: the people of the station’s line, with the station recorded', async () => {
		const proc = await makeProcess();
		const r = await assignProcess(actorOf(quality), viewer(quality), {
			processId: proc.id,
			scope: 'station',
			personId: null,
			lineId: null,
			stationId,
			dueOn: ''
		});
		expect(r.assigned).toBe(3);
		const rows = await assignmentsOf(proc.id);
		expect(rows.every((x) => x.station_id === stationId && x.scope === 'station')).toBe(true);
	});

	it('refuses a due date that has passed and a deactivated person, writing nothing', async () => {
		const proc = await makeProcess();
		await expect(
			assignProcess(actorOf(quality), viewer(quality), {
				processId: proc.id,
				scope: 'line',
				personId: null,
				lineId,
				stationId: null,
				dueOn: '2020-01-01'
			})
		).rejects.toMatchObject({ status: 400, fields: { dueOn: expect.any(String) } });
		await expect(
			assignProcess(actorOf(quality), viewer(quality), {
				processId: proc.id,
				scope: 'person',
				personId: inactive.id,
				lineId: null,
				stationId: null,
				dueOn: ''
			})
		).rejects.toMatchObject({ status: 400, fields: { personId: expect.any(String) } });
		expect(await assignmentsOf(proc.id)).toHaveLength(0);
	});
});

describe('a line lead', () => {
	it('cannot assign on another line (server function and form action), and nothing is stored', async () => {
		const proc = await makeProcess();
		const audits = await auditCount('assignment.created');
		for (const [scope, target] of [
			['line', { lineId }],
			['station', { stationId }],
			['person', { personId: crew[1].id }]
		] as const) {
			await expect(
				assignProcess(actorOf(lead), viewer(lead), {
					processId: proc.id,
					scope,
					personId: null,
					lineId: null,
					stationId: null,
					dueOn: '',
					...target
				})
			).rejects.toMatchObject({ status: 403 });
		}
		const client = await signInWithPassword(lead.email!, lead.password);
		const res = await client.postForm('/assignments?/assign', {
			processId: proc.id,
			scope: 'line',
			lineId
		});
		expect(res.status).toBe(403);
		expect(await res.text()).toMatch(/not on your line/);
		expect(await assignmentsOf(proc.id)).toHaveLength(0);
		expect(await auditCount('assignment.created')).toBe(audits);
	});

	it('sees and closes only assignments on their own line (others are 404)', async () => {
		const proc = await makeProcess();
		await assignProcess(actorOf(quality), viewer(quality), {
			processId: proc.id,
			scope: 'line',
			personId: null,
			lineId,
			stationId: null,
			dueOn: ''
		});
		const [row] = await queryRows<{ id: number }>(
			appDb(),
			'SELECT id FROM assignments WHERE process_id = ? AND person_id = ?',
			[proc.id, crew[2].id]
		);
		const leadList = await listOpenAssignments(viewer(lead), { processId: proc.id });
		expect(leadList).toHaveLength(0);
		await expect(
			closeAssignment(actorOf(lead), viewer(lead), row.id, 'not mine')
		).rejects.toMatchObject({ status: 404 });

		const closed = await auditCount('assignment.closed');
		await closeAssignment(actorOf(quality), viewer(quality), row.id, 'moved to line L2');
		expect(await auditCount('assignment.closed')).toBe(closed + 1);
		const [after] = await queryRows<{ closed_at: Date | null; closed_reason: string }>(
			appDb(),
			'SELECT closed_at, closed_reason FROM assignments WHERE id = ?',
			[row.id]
		);
		expect(after.closed_at).not.toBeNull();
		expect(after.closed_reason).toBe('moved to line L2');
		await expect(
			closeAssignment(actorOf(quality), viewer(quality), row.id, 'twice')
		).rejects.toMatchObject({ status: 409 });
		expect(await auditCount('assignment.closed')).toBe(closed + 1);
		const open = await listOpenAssignments(viewer(quality), { processId: proc.id, lineId });
		expect(open.map((o) => o.person).sort()).toEqual(
			[crew[0].displayName, crew[1].displayName].sort()
		);
	});
});

describe('crew progress', () => {
	it('lists each person of the line with their assigned processes, overdue flagged', async () => {
		const proc = await makeProcess();
		await assignProcess(
			actorOf(quality),
			viewer(quality),
			{
				processId: proc.id,
				scope: 'line',
				personId: null,
				lineId,
				stationId: null,
				dueOn: '2020-02-01'
			},
			new Date('2020-01-01T00:00:00Z')
		);
		const result = await crewProgress(viewer(quality), lineId);
		expect(result.line?.id).toBe(lineId);
		expect(result.people.map((p) => p.id).sort()).toEqual(crew.map((c) => c.id).sort());
		for (const p of result.people) {
			const item = p.items.find((i) => i.processCode === proc.code);
			// No rule exists for the fresh process: nobody can get further, and the date has passed.
			expect(item).toMatchObject({ state: 'no_rule', overdue: true, dueOn: '2020-02-01' });
		}
		// A lead of another line does not reach this one.
		const other = await crewProgress(viewer(lead), lineId);
		expect(other.line).toBeNull();
	});
});
