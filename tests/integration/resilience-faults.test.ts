// MariaDB killed (SIGKILL) in the middle of each multi-row write. The write runs in this process
// and pauses at its fault point (src/lib/server/faults.ts) with part of its rows written and not
// committed; the test proves that from a READ UNCOMMITTED connection, kills mariadbd, lets the
// write go on, and then checks: the write rejected with an error the user sees only as a message
// and a reference id; while the database is down the built app answers with such ids, the gate
// denies, and health says degraded; after the restart the same app (never restarted) serves pages
// and the gate again, SQL invariants hold (nothing half-written, the audit chain verifies), and a
// retry succeeds exactly once.
//
// Adding a write is one row in CASES.
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import mysql from 'mysql2/promise';
import {
	appDb,
	closeDbHelpers,
	createTestPerson,
	ownerUrl,
	queryRows,
	retireTestPeople,
	TEST_PASSWORD,
	type TestPerson as DbPerson
} from '../helpers/db';
import { APP_URL, signInWithPassword, type HttpClient } from '../helpers/http-session';
import { acknowledge, makeProcess, makeRule, makeStation } from '../helpers/training-fixtures';
import { approveAt, makeInstruction, type TestPerson } from '../helpers/instruction-fixtures';
import { makeCheckFixture } from '../helpers/check-fixtures';
import { isRunning, killTestDatabase, startTestDatabase } from '../helpers/mariadb-control';
import { armFaultPoint, disarmFaultPoints, type FaultPointName } from '../../src/lib/server/faults';
import { pool } from '../../src/lib/server/db';
import { verifyAuditChain } from '../../src/lib/server/audit';
import { createApiKey } from '../../src/lib/server/apikeys';
import { evaluateAndIssue } from '../../src/lib/server/certificates/issue';
import { startAttempt, submitAttempt } from '../../src/lib/server/training/checks/index';
import { grantSupervisedRun } from '../../src/lib/server/gate/supervised';
import { runRetention } from '../../src/lib/server/records/retention';
import { checkStationAccess } from '../../src/lib/server/gate';
import { displayStatus, pickEffective } from '../../src/lib/server/instructions/effective';
import { Refusal } from '../../src/lib/server/errors';
import type { RevisionState } from '../../src/lib/instructions/vocabulary';
import type { Role } from '../../src/lib/roles';

const HOUR = 3_600_000;
const ZONE = 'Asia/Ho_Chi_Minh';
// What the page and the API may never show: stack frames, driver errors, SQL.
const LEAK =
	/\bat [\w.<>]+ \(|node_modules|\.js:\d+:\d+|ECONNREFUSED|PROTOCOL_|\bselect\b.+\bfrom\b/i;

let siteId: number;
let lead: DbPerson;
let leadClient: HttpClient;
let supervisor: DbPerson;
let station: { id: number; code: string };
let gateKey: string;
let author: TestPerson;
let approver: TestPerson;
/** Highest ids before this file ran: the invariants cover every row written since. */
const base = {
	certificate: 0,
	revision: 0,
	attempt: 0,
	supervisedRun: 0,
	retentionRun: 0,
	auditSeq: 0
};
const survived: string[] = [];

const count = async (sql: string, params: unknown[] = []) =>
	Number(Object.values((await queryRows(appDb(), sql, params))[0] ?? { n: 0 })[0]);

/** The instruction-fixture person shape (with an audit actor) for a person made by the db helper. */
const withActor = (p: DbPerson): TestPerson => ({
	...p,
	email: p.email ?? `${p.employeeNo.toLowerCase()}@test.kbo2.example`,
	badge: p.badge ?? undefined,
	actor: { id: p.id, label: p.displayName, address: '127.0.0.1' }
});

async function person(roles: Role[], opts: { line?: 'L1' | 'L2'; withEmail?: boolean } = {}) {
	return createTestPerson({ roles, ...opts });
}

async function gate(badge: string) {
	const started = Date.now();
	const res = await fetch(`${APP_URL}/api/v1/gate/checks`, {
		method: 'POST',
		headers: { 'content-type': 'application/json', authorization: `Bearer ${gateKey}` },
		body: JSON.stringify({ station: station.code, badge })
	});
	return { status: res.status, body: await res.json(), ms: Date.now() - started };
}

function within<T>(p: Promise<T>, ms: number, what: string): Promise<T> {
	let timer: NodeJS.Timeout | undefined;
	return Promise.race([
		p.finally(() => clearTimeout(timer)),
		new Promise<T>((_, reject) => {
			timer = setTimeout(() => reject(new Error(`${what} within ${ms} ms`)), ms);
		})
	]);
}

/** A COUNT(*) as seen from outside the paused transaction, with and without its uncommitted rows. */
async function peek(sql: string, params: unknown[]) {
	const conn = await mysql.createConnection({ uri: ownerUrl() });
	try {
		const read = async (level: string) => {
			await conn.query(`SET SESSION TRANSACTION ISOLATION LEVEL ${level}`);
			const [rows] = await conn.query<mysql.RowDataPacket[]>(sql, params);
			return Number(Object.values(rows[0])[0]);
		};
		return { uncommitted: await read('READ UNCOMMITTED'), committed: await read('READ COMMITTED') };
	} finally {
		await conn.end();
	}
}

/**
 * Invariants over everything written since this file started, each query listing offenders:
 * certificates whole (basis rows and audit row), revisions approved whole (signature and audit row),
 * attempts graded whole or not at all, supervised runs with their audit row and mail, no audit row
 * of a change that is not there, and the hash chain intact.
 */
async function expectInvariants() {
	const offenders: Record<string, string> = {
		'certificate without basis rows, audit row or final number': `
			SELECT c.id FROM certificates c WHERE c.id > ${base.certificate} AND (c.number LIKE 'pending-%'
			  OR NOT EXISTS (SELECT 1 FROM certificate_basis b WHERE b.certificate_id = c.id)
			  OR (SELECT COUNT(*) FROM audit_events a WHERE a.action = 'certificate.issued'
			        AND a.entity_type = 'certificate' AND a.entity_id = c.id) <> 1)`,
		'superseded certificate without its successor and audit row': `
			SELECT c.id FROM certificates c WHERE c.id > ${base.certificate} AND c.state = 'superseded' AND (
			  NOT EXISTS (SELECT 1 FROM certificates n WHERE n.previous_id = c.id)
			  OR NOT EXISTS (SELECT 1 FROM audit_events a WHERE a.action = 'certificate.superseded'
			        AND a.entity_type = 'certificate' AND a.entity_id = c.id))`,
		'approved revision without approval fields, one approval signature and one audit row': `
			SELECT r.id FROM revisions r WHERE r.id > ${base.revision} AND r.state IN ('approved', 'superseded') AND (
			  r.approved_at IS NULL OR r.approved_by IS NULL OR r.effective_from IS NULL
			  OR (SELECT COUNT(*) FROM signatures s WHERE s.record_type = 'revision' AND s.record_id = r.id
			        AND s.meaning = 'approved') <> 1
			  OR (SELECT COUNT(*) FROM audit_events a WHERE a.action = 'revision.approved'
			        AND a.entity_type = 'revision' AND a.entity_id = r.id) <> 1)`,
		'unapproved revision with approval traces': `
			SELECT r.id FROM revisions r WHERE r.id > ${base.revision} AND r.state IN ('draft', 'in_review') AND (
			  r.approved_at IS NOT NULL OR r.effective_from IS NOT NULL
			  OR EXISTS (SELECT 1 FROM signatures s WHERE s.record_type = 'revision' AND s.record_id = r.id
			        AND s.meaning = 'approved'))`,
		'revision marked superseded with no later revision in force': `
			SELECT r.id FROM revisions r WHERE r.id > ${base.revision} AND r.state = 'superseded' AND NOT EXISTS (
			  SELECT 1 FROM revisions n WHERE n.instruction_id = r.instruction_id
			    AND n.state IN ('approved', 'superseded') AND n.effective_from <= NOW(3)
			    AND n.effective_from > r.effective_from)`,
		'graded attempt with missing or ungraded items, or without its one audit row': `
			SELECT t.id FROM check_attempts t WHERE t.id > ${base.attempt} AND t.state <> 'open' AND (
			  t.submitted_at IS NULL OR t.score_pct IS NULL OR t.passed IS NULL
			  OR NOT EXISTS (SELECT 1 FROM attempt_items i WHERE i.attempt_id = t.id)
			  OR EXISTS (SELECT 1 FROM attempt_items i WHERE i.attempt_id = t.id AND i.correct IS NULL)
			  OR (SELECT COUNT(*) FROM audit_events a WHERE a.action = 'attempt.submitted'
			        AND a.entity_type = 'check_attempt' AND a.entity_id = t.id) <> 1)`,
		'open attempt with graded items or a submission audit row': `
			SELECT t.id FROM check_attempts t WHERE t.id > ${base.attempt} AND t.state = 'open' AND (
			  t.submitted_at IS NOT NULL
			  OR EXISTS (SELECT 1 FROM attempt_items i WHERE i.attempt_id = t.id AND i.correct IS NOT NULL)
			  OR EXISTS (SELECT 1 FROM audit_events a WHERE a.action = 'attempt.submitted'
			        AND a.entity_type = 'check_attempt' AND a.entity_id = t.id))`,
		'supervised run without its one audit row and its mail': `
			SELECT r.id FROM supervised_runs r WHERE r.id > ${base.supervisedRun} AND (
			  (SELECT COUNT(*) FROM audit_events a WHERE a.action = 'supervised_run.granted'
			     AND a.entity_type = 'supervised_run' AND a.entity_id = r.id) <> 1
			  OR NOT EXISTS (SELECT 1 FROM mail_outbox m
			     WHERE m.dedupe_key LIKE CONCAT('supervised_run:run:', r.id, ':%')))`,
		'anonymised person without their one disposition and audit row': `
			SELECT p.id FROM people p WHERE p.anonymised_at IS NOT NULL AND (
			  (SELECT COUNT(*) FROM retention_dispositions d WHERE d.entity_type = 'person'
			     AND d.entity_id = p.id AND d.action = 'anonymised') <> 1
			  OR (SELECT COUNT(*) FROM audit_events a WHERE a.action = 'person.anonymised'
			     AND a.entity_type = 'person' AND a.entity_id = p.id) <> 1)`,
		'audit row of a change that is not there': `
			SELECT a.seq FROM audit_events a WHERE a.seq > ${base.auditSeq} AND (
			  (a.action = 'certificate.issued' AND NOT EXISTS (SELECT 1 FROM certificates c WHERE c.id = a.entity_id))
			  OR (a.action = 'revision.approved' AND NOT EXISTS (
			        SELECT 1 FROM revisions r WHERE r.id = a.entity_id AND r.state IN ('approved', 'superseded')))
			  OR (a.action = 'attempt.submitted' AND NOT EXISTS (
			        SELECT 1 FROM check_attempts t WHERE t.id = a.entity_id AND t.state <> 'open'))
			  OR (a.action = 'supervised_run.granted' AND NOT EXISTS (
			        SELECT 1 FROM supervised_runs r WHERE r.id = a.entity_id))
			  OR (a.action = 'person.anonymised' AND NOT EXISTS (
			        SELECT 1 FROM people p WHERE p.id = a.entity_id AND p.anonymised_at IS NOT NULL)))`
	};
	for (const [what, sql] of Object.entries(offenders)) {
		const rows = await queryRows(appDb(), sql);
		expect(
			rows.map((r) => Object.values(r)[0]),
			what
		).toEqual([]);
	}
	const chain = await verifyAuditChain();
	expect(chain.problems).toEqual([]);
	expect(chain.ok).toBe(true);
}

/** While MariaDB is dead: the built app answers with reference ids, the gate denies, health degrades. */
async function expectAppFailsClosed() {
	const health = await fetch(`${APP_URL}/api/health`);
	expect(health.status).toBe(503);
	expect(await health.json()).toMatchObject({ status: 'degraded', database: { up: false } });

	const page = await leadClient.get('/');
	expect(page.status).toBe(500);
	const html = await page.text();
	expect(html).toMatch(/Reference for the help desk: <span[^>]*>[0-9a-f]{8}</);
	expect(html).toContain('Something went wrong on our side.');
	expect(html).not.toMatch(LEAK);
	expect(page.headers.get('cache-control')).toBe('no-store');

	const api = await leadClient.get('/api/v1/readiness?line=L1', {
		headers: { accept: 'application/json' }
	});
	expect(api.status).toBe(500);
	const body = await api.text();
	expect(JSON.parse(body)).toEqual({
		message: 'Something went wrong on our side.',
		id: expect.stringMatching(/^[0-9a-f]{8}$/)
	});
	expect(body).not.toMatch(LEAK);

	const g = await gate(supervisor.badge!);
	expect(g.status).toBe(503);
	expect(g.body).toMatchObject({ decision: 'deny', reasons: [{ code: 'unavailable' }] });
	// The gate's own deadline (GATE_TIMEOUT_MS, 1500 ms by default) plus the round trip.
	expect(g.ms).toBeLessThan(2500);
}

/** After the restart the same app process serves health, a signed-in page and the gate again. */
async function expectAppRecovered() {
	let up = false;
	for (let i = 0; i < 40 && !up; i++) {
		const res = await fetch(`${APP_URL}/api/health`);
		up = res.status === 200;
		await res.body?.cancel();
		if (!up) await new Promise((r) => setTimeout(r, 250));
	}
	expect(up, '/api/health answers 200 again').toBe(true);
	const page = await leadClient.get('/');
	expect(page.status).toBe(200);
	expect(await page.text()).toContain(lead.displayName);
	const g = await gate(supervisor.badge!);
	expect(g.status).toBe(200);
	expect(g.body.decision).toBe('allow');
}

/** What the user is shown for an error: the app's own handleError (message and reference id). */
async function shownToUser(err: unknown) {
	const { handleError } = await import('../../src/hooks.server');
	const logged = vi.spyOn(console, 'error').mockImplementation(() => {});
	try {
		const url = new URL(`${APP_URL}/resilience`);
		const shown = await handleError({
			error: err,
			event: { request: new Request(url, { method: 'POST' }), url } as never,
			status: 500,
			message: 'Internal Error'
		});
		const id = (shown as { id?: string }).id ?? '';
		// The details stay in the server log, under the same id.
		expect(logged).toHaveBeenCalledWith(expect.stringContaining(`[error ${id}]`), err);
		return shown as { message: string; id?: string };
	} finally {
		logged.mockRestore();
	}
}

interface FaultCase<C> {
	point: FaultPointName;
	prepare: () => Promise<C>;
	/** The write under test, exactly as the app calls it. */
	write: (c: C) => Promise<unknown>;
	/** A COUNT(*) of the rows the write has changed when it pauses (0 outside its transaction). */
	partialSql: (c: C) => [string, unknown[]];
	/** After the crash and restart: nothing of the write is there, the state before it stands. */
	nothingWritten: (c: C) => Promise<void>;
	/** After one retry: the write is there exactly once, whole. */
	writtenOnce: (c: C, result: unknown) => Promise<void>;
	/** A second retry changes nothing (refused, or finds nothing to do). */
	again: (c: C) => Promise<void>;
}

/** The first line of an error and of its cause (drizzle wraps the driver's error). */
function rejection(err: unknown): string {
	const e = err as Error & { cause?: { code?: string; message?: string } };
	const cause = e.cause ? `; cause ${e.cause.code ?? ''} ${e.cause.message ?? ''}` : '';
	return `${e.message}${cause}`.split('\n')[0].slice(0, 120);
}

const refusal = (p: Promise<unknown>) =>
	p.then(
		() => null,
		(e: unknown) => e
	);

/** Keeps each row's context type while the table holds rows of different contexts. */
const defineCase = <C>(k: FaultCase<C>) => k as unknown as FaultCase<unknown>;

function grantRun(op: DbPerson) {
	const now = new Date();
	return grantSupervisedRun(
		{ id: lead.id, label: lead.displayName },
		{ id: lead.id, roles: lead.roles, siteId, timeZone: ZONE },
		{
			personId: op.id,
			stationId: station.id,
			supervisorId: supervisor.id,
			reason: 'Practical sign-off booked for the next shift',
			until: new Date(now.getTime() + 2 * HOUR)
		},
		now
	);
}

const CASES: FaultCase<unknown>[] = [
	defineCase<{ approver: TestPerson; ins: { instructionId: number }; a: number; b: number }>({
		point: 'publish-revision',
		prepare: async () => {
			const ins = await makeInstruction(author, approver, [
				{ source: '# Rev A\n\nBuffer sheet: replace after 200 bonds.', effectiveFrom: new Date() },
				{ source: '# Rev B\n\nBuffer sheet: replace after 150 bonds.', stop: 'review' }
			]);
			return { approver, ins, a: ins.revisionIds[0], b: ins.revisionIds[1] };
		},
		write: (c) => approveAt(c.approver, c.b, new Date()),
		partialSql: (c) => [
			"SELECT COUNT(*) FROM revisions WHERE id = ? AND state = 'approved'",
			[c.b]
		],
		nothingWritten: async (c) => {
			const revs = await revisionRows(c.ins.instructionId);
			expect(revs.find((r) => r.id === c.b)?.state).toBe('in_review');
			expect(pickEffective(revs)?.id).toBe(c.a);
			expect(
				await count(
					"SELECT COUNT(*) FROM signatures WHERE record_type = 'revision' AND record_id = ? AND meaning = 'approved'",
					[c.b]
				)
			).toBe(0);
			expect(await auditCount('revision.approved', 'revision', c.b)).toBe(0);
		},
		writtenOnce: async (c) => {
			const revs = await revisionRows(c.ins.instructionId);
			const later = new Date(Date.now() + 1000);
			const effective = pickEffective(revs, later);
			expect(effective?.id).toBe(c.b);
			expect(
				displayStatus(
					revs.find((r) => r.id === c.a)!,
					effective!.id,
					later
				)
			).toBe('superseded');
			expect(await auditCount('revision.approved', 'revision', c.b)).toBe(1);
		},
		again: async (c) => {
			const err = await refusal(approveAt(c.approver, c.b, new Date()));
			expect((err as Refusal)?.status).toBe(409);
			expect(await auditCount('revision.approved', 'revision', c.b)).toBe(1);
		}
	}),
	defineCase<{ processId: number; revisionId: number; attemptId: number; op: DbPerson }>({
		point: 'issue-certificate',
		prepare: async () => {
			// A rule asking for an acknowledgement and a passed check (pass mark 0 %, so a blank
			// attempt passes). The attempt is submitted for real before the acknowledgement exists, so
			// its own issuing finds the rule unmet; the acknowledgement is then written as a bare row,
			// and the write under test is the issuing that follows it.
			const trainer = withActor(await person(['trainer']));
			const fx = await makeCheckFixture(trainer, approver);
			const ins = await makeInstruction(author, approver, [
				{ source: '# Pressure check\n\nRead the gauge at the head.', effectiveFrom: new Date() }
			]);
			await makeRule({
				processId: fx.processId,
				createdBy: approver.id,
				version: 2,
				checkId: fx.checkId,
				passMarkPct: 0,
				practicalRequired: false,
				instructionIds: [ins.instructionId],
				activeFrom: new Date(Date.now() - 1000)
			});
			const op = await person(['operator'], { withEmail: false });
			const actor = withActor(op).actor;
			const { id: attemptId } = await startAttempt(actor, fx.processId);
			expect(await submitAttempt(actor, attemptId, null)).toMatchObject({ passed: true });
			expect(await certificatesOf(op.id, fx.processId)).toEqual([]);
			await acknowledge(op.id, ins.revisionIds[0]);
			return { processId: fx.processId, revisionId: ins.revisionIds[0], attemptId, op };
		},
		write: (c) => evaluateAndIssue(c.op.id, c.processId, { actor: null }),
		partialSql: (c) => [
			'SELECT COUNT(*) FROM certificates WHERE person_id = ? AND process_id = ?',
			[c.op.id, c.processId]
		],
		nothingWritten: async (c) => {
			expect(await certificatesOf(c.op.id, c.processId)).toEqual([]);
		},
		writtenOnce: async (c, result) => {
			const issued = result as { certificateId: number | null };
			expect(issued.certificateId).not.toBeNull();
			const certs = await certificatesOf(c.op.id, c.processId);
			expect(certs.map((x) => Number(x.id))).toEqual([issued.certificateId]);
			expect(certs[0].pdf_key).toMatch(/^certificates\/.+\.pdf$/);
			const basis = await queryRows<{ kind: string; ref_id: number; revision_id: number }>(
				appDb(),
				'SELECT kind, ref_id, revision_id FROM certificate_basis WHERE certificate_id = ? ORDER BY kind',
				[issued.certificateId]
			);
			expect(
				basis.map((b) => [b.kind, Number(b.kind === 'attempt' ? b.ref_id : b.revision_id)])
			).toEqual([
				['acknowledgement', c.revisionId],
				['attempt', c.attemptId]
			]);
			expect(await auditCount('certificate.issued', 'certificate', issued.certificateId!)).toBe(1);
		},
		again: async (c) => {
			const r = await evaluateAndIssue(c.op.id, c.processId, { actor: null });
			expect(r.certificateId).toBeNull();
			expect(await certificatesOf(c.op.id, c.processId)).toHaveLength(1);
		}
	}),
	defineCase<{ op: TestPerson; attemptId: number }>({
		point: 'submit-attempt',
		prepare: async () => {
			const trainer = withActor(await person(['trainer']));
			const quality = withActor(await person(['quality']));
			const op = withActor(await person(['operator']));
			const fx = await makeCheckFixture(trainer, quality);
			const { id } = await startAttempt(op.actor, fx.processId);
			return { op, attemptId: id };
		},
		write: (c) => submitAttempt(c.op.actor, c.attemptId, null),
		partialSql: (c) => [
			'SELECT COUNT(*) FROM attempt_items WHERE attempt_id = ? AND correct IS NOT NULL',
			[c.attemptId]
		],
		nothingWritten: async (c) => {
			const [a] = await queryRows<{ state: string; submitted_at: Date | null }>(
				appDb(),
				'SELECT state, submitted_at FROM check_attempts WHERE id = ?',
				[c.attemptId]
			);
			expect(a).toEqual({ state: 'open', submitted_at: null });
			expect(await auditCount('attempt.submitted', 'check_attempt', c.attemptId)).toBe(0);
		},
		writtenOnce: async (c, result) => {
			expect(result).toMatchObject({ state: 'submitted', passed: false });
			expect(
				await count('SELECT COUNT(*) FROM attempt_items WHERE attempt_id = ? AND correct IS NULL', [
					c.attemptId
				])
			).toBe(0);
			expect(await auditCount('attempt.submitted', 'check_attempt', c.attemptId)).toBe(1);
		},
		again: async (c) => {
			const err = await refusal(submitAttempt(c.op.actor, c.attemptId, null));
			expect(err).toBeInstanceOf(Refusal);
			expect((err as Refusal).status).toBe(409);
			expect(await auditCount('attempt.submitted', 'check_attempt', c.attemptId)).toBe(1);
		}
	}),
	defineCase<{ op: DbPerson }>({
		point: 'grant-supervised-run',
		prepare: async () => ({ op: await person(['operator'], { line: 'L1', withEmail: false }) }),
		write: (c) => grantRun(c.op),
		partialSql: (c) => [
			'SELECT COUNT(*) FROM supervised_runs WHERE person_id = ? AND station_id = ?',
			[c.op.id, station.id]
		],
		nothingWritten: async (c) => {
			expect(await runsOf(c.op.id)).toBe(0);
			const d = await checkStationAccess({
				station: station.code,
				badge: c.op.badge!,
				source: 'api'
			});
			expect(d.decision).toBe('deny');
		},
		writtenOnce: async (c, result) => {
			const { id } = result as { id: number };
			expect(await runsOf(c.op.id)).toBe(1);
			expect(await auditCount('supervised_run.granted', 'supervised_run', id)).toBe(1);
			// Mail to the supervisor, and to the leads covering for the person (who has no address).
			const keys = (
				await queryRows<{ k: string }>(
					appDb(),
					'SELECT dedupe_key AS k FROM mail_outbox WHERE dedupe_key LIKE ? ORDER BY k',
					[`supervised_run:run:${id}:%`]
				)
			).map((r) => r.k.slice(`supervised_run:run:${id}:`.length));
			expect(keys).toContain('supervisor');
			expect(keys.filter((k) => k.startsWith('person')).length).toBeGreaterThan(0);
			const d = await checkStationAccess({
				station: station.code,
				badge: c.op.badge!,
				source: 'api'
			});
			expect(d.decision).toBe('allow');
			expect(d.reasons[0].code).toBe('supervised');
		},
		again: async (c) => {
			const err = await refusal(grantRun(c.op));
			expect((err as Refusal)?.status).toBe(409);
			expect(await runsOf(c.op.id)).toBe(1);
		}
	}),
	defineCase<{ leaver: DbPerson; name: string }>({
		point: 'retention-run',
		prepare: async () => {
			const leaver = await person(['operator'], { line: 'L1' });
			// Left in 2001: past any training-records period the rules allow (at most decades).
			await queryRows(
				appDb(),
				"UPDATE people SET active = 0, employment_ended_on = '2001-01-31' WHERE id = ?",
				[leaver.id]
			);
			return { leaver, name: leaver.displayName };
		},
		write: () => runRetention({ dryRun: false, actor: { ...approver.actor, id: approver.id } }),
		partialSql: () => [
			'SELECT COUNT(*) FROM retention_runs WHERE dry_run = 0 AND id > ?',
			[base.retentionRun]
		],
		nothingWritten: async (c) => {
			const [p] = await queryRows<{ name: string; anonymised_at: Date | null }>(
				appDb(),
				'SELECT display_name AS name, anonymised_at FROM people WHERE id = ?',
				[c.leaver.id]
			);
			expect(p).toEqual({ name: c.name, anonymised_at: null });
			expect(await dispositionsOf(c.leaver.id)).toBe(0);
			expect(
				await count('SELECT COUNT(*) FROM retention_runs WHERE dry_run = 0 AND id > ?', [
					base.retentionRun
				])
			).toBe(0);
		},
		writtenOnce: async (c) => {
			const [p] = await queryRows<{ name: string; anonymised_at: Date | null }>(
				appDb(),
				'SELECT display_name AS name, anonymised_at FROM people WHERE id = ?',
				[c.leaver.id]
			);
			expect(p.name).not.toBe(c.name);
			expect(p.anonymised_at).not.toBeNull();
			expect(await dispositionsOf(c.leaver.id)).toBe(1);
			expect(await auditCount('person.anonymised', 'person', c.leaver.id)).toBe(1);
		},
		again: async (c) => {
			const second = await runRetention({
				dryRun: false,
				actor: { ...approver.actor, id: approver.id }
			});
			expect(second.plan.people.map((p) => p.id)).not.toContain(c.leaver.id);
			expect(await dispositionsOf(c.leaver.id)).toBe(1);
			expect(await auditCount('person.anonymised', 'person', c.leaver.id)).toBe(1);
		}
	})
];

const dispositionsOf = (personId: number) =>
	count(
		"SELECT COUNT(*) FROM retention_dispositions WHERE entity_type = 'person' AND entity_id = ?",
		[String(personId)]
	);

async function revisionRows(instructionId: number) {
	const rows = await queryRows<{ id: number; state: RevisionState; effective_from: Date | null }>(
		appDb(),
		'SELECT id, state, effective_from FROM revisions WHERE instruction_id = ? ORDER BY id',
		[instructionId]
	);
	return rows.map((r) => ({ id: Number(r.id), state: r.state, effectiveFrom: r.effective_from }));
}

const auditCount = (action: string, entityType: string, entityId: number) =>
	count(
		'SELECT COUNT(*) FROM audit_events WHERE action = ? AND entity_type = ? AND entity_id = ?',
		[action, entityType, String(entityId)]
	);

const certificatesOf = (personId: number, processId: number) =>
	queryRows<{ id: number; pdf_key: string | null }>(
		appDb(),
		'SELECT id, pdf_key FROM certificates WHERE person_id = ? AND process_id = ? ORDER BY id',
		[personId, processId]
	);

const runsOf = (personId: number) =>
	count('SELECT COUNT(*) FROM supervised_runs WHERE person_id = ? AND station_id = ?', [
		personId,
		station.id
	]);

/**
 * A process whose rule asks only for the acknowledgement of one instruction in force; the
 * instruction goes through the real workflow, so it has its signature and audit rows.
 */
async function ackOnlyProcess() {
	const proc = await makeProcess();
	const ins = await makeInstruction(author, approver, [
		{ source: '# Buffer sheet change\n\nLet the head cool first.', effectiveFrom: new Date() }
	]);
	await makeRule({
		processId: proc.id,
		createdBy: lead.id,
		instructionIds: [ins.instructionId],
		practicalRequired: false
	});
	return { processId: proc.id, revisionId: ins.revisionIds[0] };
}

beforeAll(async () => {
	process.env.PADBRIDGE_FAULT_POINTS = '1';
	[{ id: siteId }] = await queryRows<{ id: number }>(
		appDb(),
		"SELECT id FROM sites WHERE code = 'KBO-2'"
	);
	const [b] = await queryRows<Record<keyof typeof base, number | null>>(
		appDb(),
		`SELECT (SELECT MAX(id) FROM certificates) AS certificate, (SELECT MAX(id) FROM revisions) AS revision,
		   (SELECT MAX(id) FROM check_attempts) AS attempt, (SELECT MAX(id) FROM supervised_runs) AS supervisedRun,
		   (SELECT MAX(id) FROM retention_runs) AS retentionRun,
		   (SELECT MAX(seq) FROM audit_events) AS auditSeq`
	);
	for (const k of Object.keys(base) as (keyof typeof base)[]) base[k] = Number(b[k] ?? 0);

	lead = await person(['lead'], { line: 'L1' });
	author = withActor(await person(['trainer']));
	approver = withActor(await person(['quality']));
	leadClient = await signInWithPassword(lead.email!, TEST_PASSWORD);
	// The supervisor, and the gate's allowed badge: certified through the real issuing path.
	const q = await ackOnlyProcess();
	supervisor = await person(['operator'], { line: 'L1' });
	await acknowledge(supervisor.id, q.revisionId);
	expect((await evaluateAndIssue(supervisor.id, q.processId)).certificateId).not.toBeNull();
	station = await makeStation([q.processId]);
	gateKey = (
		await createApiKey(
			{ id: lead.id, label: lead.displayName },
			{ name: 'resilience gate', scope: 'gate', stationId: station.id }
		)
	).key;
	await expectInvariants();
});

afterAll(async () => {
	disarmFaultPoints();
	delete process.env.PADBRIDGE_FAULT_POINTS;
	// Whatever happened above, the next test file finds the database running.
	await startTestDatabase();
	await retireTestPeople();
	await closeDbHelpers();
	await pool.end();
	if (survived.length)
		console.info(`faults survived (${survived.length}):\n  ${survived.join('\n  ')}`);
});

describe('MariaDB killed in the middle of a multi-row write', () => {
	for (const k of CASES) {
		it(
			`${k.point}: rolled back whole, the user sees a reference id, a retry succeeds once`,
			{
				timeout: 120_000
			},
			async () => {
				const c = await k.prepare();
				const fault = armFaultPoint(k.point);
				const outcome = refusal(k.write(c));
				let killedPid = 0;
				let restartMs = 0;
				let err: unknown;
				try {
					try {
						await within(fault.reached, 20_000, `the write reached fault point ${k.point}`);
						const [sql, params] = k.partialSql(c);
						const seen = await peek(sql, params);
						// Part of the write is in the database, uncommitted: the kill lands mid-write.
						expect(seen.uncommitted).toBeGreaterThan(0);
						expect(seen.committed).toBe(0);
						killedPid = await killTestDatabase();
						expect(await isRunning(killedPid)).toBe(false);
					} finally {
						fault.release();
					}
					err = await within(outcome, 20_000, 'the paused write finished');
					expect(err, 'the write rejected').toBeInstanceOf(Error);
					expect(err).not.toBeInstanceOf(Refusal);
					expect(await shownToUser(err)).toEqual({
						message: 'Something went wrong on our side.',
						id: expect.stringMatching(/^[0-9a-f]{8}$/)
					});
					await expectAppFailsClosed();
				} finally {
					// Up again whatever failed above (a no-op when it was never killed).
					const t = Date.now();
					await startTestDatabase();
					restartMs = Date.now() - t;
				}
				await expectAppRecovered();
				await expectInvariants();
				// What was there uncommitted at the kill is gone, and so is the rest of the write.
				expect(await count(...k.partialSql(c))).toBe(0);
				await k.nothingWritten(c);

				const result = await k.write(c);
				await k.writtenOnce(c, result);
				await k.again(c);
				await expectInvariants();
				survived.push(
					`${k.point}: mariadbd pid ${killedPid} killed mid-write; the write rejected (${rejection(err)}); restarted in ${restartMs} ms; the retry wrote it once`
				);
			}
		);
	}
});
