// Knowledge checks against the real MariaDB and the built server: authoring and approval,
// drawing and grading per kind, calculated keys from the calculator, grading once under parallel
// submissions, immutability by trigger, no answer keys in responses, cool-down, time limit, IDOR.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { and, asc, count, eq } from 'drizzle-orm';
import { db } from '../../src/lib/server/db/index';
import {
	attemptItems,
	auditEvents,
	checkAttempts,
	checkQuestions,
	checkVersions,
	knowledgeChecks,
	signatures
} from '../../src/lib/server/db/schema/index';
import {
	approveVersion,
	createNextVersion,
	getAttemptView,
	itemStatistics,
	saveAnswers,
	startAttempt,
	submitAttempt,
	submitVersion,
	type Responses
} from '../../src/lib/server/training/checks/index';
import { Refusal } from '../../src/lib/server/errors';
import { runCalculator } from '../../src/lib/calculators/registry';
import type { CalcSpec } from '../../src/lib/training/checks/calculated';
import { formatLocal } from '../../src/lib/time';
import { appDb, closeDbHelpers } from '../helpers/db';
import {
	PLANT_ZONE,
	createTestPerson,
	signIn,
	type Session,
	type TestPerson
} from '../helpers/instruction-fixtures';
import { EXPLAIN, NUMERIC_KEY, makeCheckFixture } from '../helpers/check-fixtures';

let trainer: TestPerson;
let quality: TestPerson;
let opA: TestPerson;
let opB: TestPerson;
let fx: Awaited<ReturnType<typeof makeCheckFixture>>;
let sessionA: Session;
let sessionB: Session;
let sessionTrainer: Session;

beforeAll(async () => {
	trainer = await createTestPerson(['trainer']);
	quality = await createTestPerson(['quality']);
	opA = await createTestPerson(['operator']);
	opB = await createTestPerson(['operator']);
	fx = await makeCheckFixture(trainer, quality);
	sessionA = await signIn(opA, 'badge');
	sessionB = await signIn(opB, 'badge');
	sessionTrainer = await signIn(trainer);
});

afterAll(async () => {
	await closeDbHelpers();
});

/** The server-side items of an attempt (keys included), as only a test may read them. */
async function itemsOf(attemptId: number) {
	return db
		.select({
			position: attemptItems.position,
			params: attemptItems.params,
			prompt: attemptItems.prompt,
			choiceOrder: attemptItems.choiceOrder,
			answerKey: attemptItems.answerKey,
			kind: checkQuestions.kind,
			calc: checkQuestions.calc
		})
		.from(attemptItems)
		.innerJoin(checkQuestions, eq(checkQuestions.id, attemptItems.questionId))
		.where(eq(attemptItems.attemptId, attemptId))
		.orderBy(asc(attemptItems.position));
}

type Item = Awaited<ReturnType<typeof itemsOf>>[number];

/** Right answers built from the stored keys; `wrong` names positions answered wrongly. */
function answersFor(items: Item[], wrong: Set<string> = new Set()): Responses {
	const out: Responses = {};
	for (const i of items) {
		const key = i.answerKey as { correct?: string | string[]; value?: number };
		const bad = wrong.has(i.kind);
		if (i.kind === 'numeric' || i.kind === 'calculated')
			out[i.position] = String(bad ? (key.value as number) * 2 + 1 : key.value);
		else if (i.kind === 'multiple')
			out[i.position] = bad ? [(key.correct as string[])[0]] : (key.correct as string[]);
		else
			out[i.position] = bad
				? (i.choiceOrder ?? []).find((c) => c !== key.correct)!
				: (key.correct as string);
	}
	return out;
}

const auditCount = async (action: string, entityId: number) =>
	(
		await db
			.select({ n: count() })
			.from(auditEvents)
			.where(and(eq(auditEvents.action, action), eq(auditEvents.entityId, String(entityId))))
	)[0].n;

describe('authoring and approval', () => {
	it('approved version 1 carries an approval signature bound to its content hash', async () => {
		const [v] = await db.select().from(checkVersions).where(eq(checkVersions.id, fx.versionId));
		expect(v.state).toBe('approved');
		expect(v.contentHash).toMatch(/^[0-9a-f]{64}$/);
		const sigs = await db
			.select()
			.from(signatures)
			.where(
				and(eq(signatures.recordType, 'check_version'), eq(signatures.recordId, fx.versionId))
			);
		expect(sigs).toHaveLength(1);
		expect(sigs[0]).toMatchObject({
			meaning: 'approved',
			signerId: quality.id,
			contentHash: v.contentHash
		});
	});

	it('the author can never approve their own version, even holding the quality role', async () => {
		const both = await createTestPerson(['trainer', 'quality']);
		const { id } = await createNextVersion(both.actor, fx.checkId);
		await submitVersion(both.actor, id);
		const err = await approveVersion(both.actor, id, { password: both.password }).catch((e) => e);
		expect(err).toBeInstanceOf(Refusal);
		expect((err as Refusal).status).toBe(403);
		expect(await auditCount('check_version.self_approval_refused', id)).toBe(1);
		const [v] = await db.select().from(checkVersions).where(eq(checkVersions.id, id));
		expect(v.state).toBe('in_review');
		// Over HTTP too: the approve action refuses the author.
		const s = await signIn(both);
		const res = await s.fetch(`/checks/${fx.checkId}/versions/${id}?/approve`, {
			method: 'POST',
			headers: { 'content-type': 'application/x-www-form-urlencoded', accept: 'text/html' },
			body: new URLSearchParams({ password: both.password })
		});
		expect(res.status).toBe(403);
		expect((await db.select().from(checkVersions).where(eq(checkVersions.id, id)))[0].state).toBe(
			'in_review'
		);
		// Another quality engineer approves it; version 1 is retired in the same step.
		await approveVersion(quality.actor, id, { password: quality.password });
		const states = await db
			.select({ version: checkVersions.version, state: checkVersions.state })
			.from(checkVersions)
			.where(eq(checkVersions.checkId, fx.checkId))
			.orderBy(asc(checkVersions.version));
		expect(states).toEqual([
			{ version: 1, state: 'retired' },
			{ version: 2, state: 'approved' }
		]);
	});

	it('refuses a calculated question whose ranges leave the calculator range, keeping the input', async () => {
		const { id } = await createNextVersion(trainer.actor, fx.checkId);
		const res = await sessionTrainer.fetch(`/checks/${fx.checkId}/versions/${id}/questions/new`, {
			method: 'POST',
			headers: { 'content-type': 'application/x-www-form-urlencoded', accept: 'text/html' },
			body: new URLSearchParams({
				kind: 'calculated',
				prompt: 'Force for {bumpCount} bumps?',
				calculatorId: 'bond-force',
				output: 'forceN',
				unit: 'N',
				tolerancePct: '2',
				points: '1',
				params:
					'basis = bump\nbumpWidthUm = 18\nbumpLengthUm = 95\nbumpCount: 1000..1300 step 50\npressureMPa: 0..80 step 5'
			})
		});
		expect(res.status).toBe(400);
		const html = await res.text();
		expect(html).toContain('leaves the calculator');
		expect(html).toContain('pressureMPa: 0..80 step 5');
		const pool = await db
			.select({ n: count() })
			.from(checkQuestions)
			.where(eq(checkQuestions.checkVersionId, id));
		expect(pool[0].n).toBe(5); // copied from version 2, nothing added
	});
});

describe('attempts', () => {
	it('draws the pool with calculated keys equal to the calculator result for the drawn parameters', async () => {
		const { id } = await startAttempt(opA.actor, fx.processId);
		const items = await itemsOf(id);
		expect(items.map((i) => i.kind).sort()).toEqual(
			['calculated', 'multiple', 'numeric', 'single', 'true_false'].sort()
		);
		const calc = items.find((i) => i.kind === 'calculated')!;
		const spec = calc.calc as unknown as CalcSpec;
		const fixed = Object.fromEntries(
			Object.entries(spec.params).flatMap(([k, p]) => ('value' in p ? [[k, p.value]] : []))
		);
		const run = runCalculator('bond-force', { ...fixed, ...calc.params });
		expect(run.ok).toBe(true);
		expect((calc.answerKey as { value: number }).value).toBe(run.ok && run.outputs.forceN);
		expect(calc.prompt).toContain(`${calc.params!.pressureMPa} MPa`);
		expect(calc.prompt).not.toContain('{');
		// Independent check of one draw: force = count × width × length × pressure (1 MPa = 1 N/mm²).
		const p = calc.params!;
		expect((calc.answerKey as { value: number }).value).toBeCloseTo(
			p.bumpCount * 18 * 95 * 1e-6 * p.pressureMPa,
			9
		);
		// Starting again resumes the open attempt instead of opening a second one.
		expect(await startAttempt(opA.actor, fx.processId)).toEqual({ id, resumed: true });
	});

	it('never sends an answer key or an explanation to the browser before submission', async () => {
		const { id } = await startAttempt(opA.actor, fx.processId);
		const items = await itemsOf(id);
		const calcKey = String(
			(items.find((i) => i.kind === 'calculated')!.answerKey as { value: number }).value
		);
		const bodies = [
			await (await sessionA.fetch(`/training/attempts/${id}`)).text(),
			await (await sessionA.fetch(`/training/attempts/${id}/__data.json`)).text(),
			await (
				await sessionA.fetch(`/api/v1/attempts/${id}`, { headers: { accept: 'application/json' } })
			).text()
		];
		for (const body of bodies) {
			expect(body).toContain('Numeric: enter the distinctive value.');
			expect(body).not.toContain(NUMERIC_KEY);
			expect(body).not.toContain(calcKey);
			expect(body).not.toMatch(/answerKey|"correct"|tolerance|"value"/i);
			for (let n = 1; n <= 5; n++) expect(body).not.toContain(EXPLAIN(n));
		}
		// The page is usable by label: a fieldset per question and the unit beside numeric inputs.
		expect(bodies[0]).toContain('Submit answers');
		expect(bodies[0].match(/<fieldset/g)?.length).toBe(5);
	});

	it('grades each kind on the server, tolerance edges included, and shows only wrong items with explanations', async () => {
		const { id } = await startAttempt(opA.actor, fx.processId);
		const items = await itemsOf(id);
		const answers = answersFor(items, new Set(['single', 'multiple']));
		// Numeric exactly at the edge of its ± 0.5 band counts as correct.
		const numeric = items.find((i) => i.kind === 'numeric')!;
		answers[numeric.position] = String(Number(NUMERIC_KEY) + 0.5);
		// Calculated at +1.9 % of the key is inside ± 2 %.
		const calc = items.find((i) => i.kind === 'calculated')!;
		answers[calc.position] = String((calc.answerKey as { value: number }).value * 1.019);
		// Submitted as a plain form post, as a browser without JavaScript sends it.
		const form = new URLSearchParams();
		for (const [pos, v] of Object.entries(answers))
			for (const x of ([] as string[]).concat(v as string)) form.append(`q${pos}`, x);
		const res = await sessionA.fetch(`/training/attempts/${id}?/submit`, {
			method: 'POST',
			headers: { 'content-type': 'application/x-www-form-urlencoded', accept: 'text/html' },
			body: form
		});
		expect(res.status).toBe(303);
		const [a] = await db.select().from(checkAttempts).where(eq(checkAttempts.id, id));
		expect(a).toMatchObject({ state: 'submitted', scorePct: 60, passed: false, passMarkPct: 80 });
		const graded = await db
			.select({ position: attemptItems.position, correct: attemptItems.correct })
			.from(attemptItems)
			.where(eq(attemptItems.attemptId, id));
		const byKind = Object.fromEntries(
			items.map((i) => [i.kind, graded.find((g) => g.position === i.position)!.correct])
		);
		expect(byKind).toEqual({
			single: false,
			multiple: false,
			true_false: true,
			numeric: true,
			calculated: true
		});
		const html = await (await sessionA.fetch(`/training/attempts/${id}`)).text();
		expect(html).toContain('Not passed');
		expect(html).toContain(EXPLAIN(1));
		expect(html).toContain(EXPLAIN(2));
		expect(html).not.toContain(EXPLAIN(3));
		expect(html).not.toContain(NUMERIC_KEY);
	});

	it('a numeric answer just outside the tolerance is wrong; all right passes', async () => {
		const now = new Date(Date.now() + 120_000);
		const { id } = await startAttempt(opA.actor, fx.processId, { now });
		const items = await itemsOf(id);
		const answers = answersFor(items);
		const numeric = items.find((i) => i.kind === 'numeric')!;
		answers[numeric.position] = String(Number(NUMERIC_KEY) + 0.51);
		const r = await submitAttempt(opA.actor, id, answers, { now });
		expect(r).toMatchObject({ state: 'submitted', scorePct: 80, passed: true });
	});

	it('two parallel submissions grade once: one result, one audit event, the other gets 409', async () => {
		const { id } = await startAttempt(opB.actor, fx.processId);
		const items = await itemsOf(id);
		const body = JSON.stringify({ answers: answersFor(items) });
		const post = () =>
			sessionB.fetch(`/api/v1/attempts/${id}/submit`, {
				method: 'POST',
				headers: { 'content-type': 'application/json', accept: 'application/json' },
				body
			});
		const responses = await Promise.all([post(), post()]);
		const statuses = responses.map((r) => r.status).sort();
		expect(statuses).toEqual([200, 409]);
		const refused = await responses.find((r) => r.status === 409)!.json();
		expect(refused.error).toMatch(/already submitted/);
		const ok = await responses.find((r) => r.status === 200)!.json();
		expect(ok).toEqual({ state: 'submitted', scorePct: 100, passed: true });
		expect(JSON.stringify(ok)).not.toContain(NUMERIC_KEY);
		expect(await auditCount('attempt.submitted', id)).toBe(1);
		// And straight through the server function, racing in one process.
		const { id: id2 } = await startAttempt(opB.actor, fx.processId);
		const settled = await Promise.allSettled([
			submitAttempt(opB.actor, id2, {}),
			submitAttempt(opB.actor, id2, {})
		]);
		expect(settled.filter((s) => s.status === 'fulfilled')).toHaveLength(1);
		const rejected = settled.find((s) => s.status === 'rejected') as PromiseRejectedResult;
		expect((rejected.reason as Refusal).status).toBe(409);
		expect(await auditCount('attempt.submitted', id2)).toBe(1);
	});

	it('the trigger refuses UPDATE and DELETE of a submitted attempt through the app DB user', async () => {
		const [a] = await db
			.select({ id: checkAttempts.id })
			.from(checkAttempts)
			.where(and(eq(checkAttempts.personId, opB.id), eq(checkAttempts.state, 'submitted')))
			.limit(1);
		const app = appDb();
		await expect(
			app.query('UPDATE check_attempts SET score_pct = 100 WHERE id = ?', [a.id])
		).rejects.toThrow(/immutable/);
		await expect(
			app.query('UPDATE attempt_items SET correct = 1 WHERE attempt_id = ?', [a.id])
		).rejects.toThrow(/immutable/);
		await expect(
			app.query('DELETE FROM attempt_items WHERE attempt_id = ?', [a.id])
		).rejects.toThrow(/never deleted/);
		await expect(app.query('DELETE FROM check_attempts WHERE id = ?', [a.id])).rejects.toThrow(
			/never deleted/
		);
	});

	it("another operator's attempt answers 404 with no data on the page, __data.json and the API", async () => {
		const [a] = await db
			.select({ id: checkAttempts.id })
			.from(checkAttempts)
			.where(eq(checkAttempts.personId, opA.id))
			.limit(1);
		for (const path of [
			`/training/attempts/${a.id}`,
			`/training/attempts/${a.id}/__data.json`,
			`/api/v1/attempts/${a.id}`
		]) {
			const res = await sessionB.fetch(path, {
				headers: { accept: path.startsWith('/api') ? 'application/json' : 'text/html' }
			});
			const body = await res.text();
			if (path.endsWith('__data.json')) expect(body).toMatch(/"status":404/);
			else expect(res.status).toBe(404);
			expect(body).not.toContain('Single: which thaw?');
			expect(body).not.toContain(opA.displayName);
		}
		// A submitting post to someone else's attempt is a 404 as well, and changes nothing.
		const res = await sessionB.fetch(`/training/attempts/${a.id}?/submit`, {
			method: 'POST',
			headers: { 'content-type': 'application/x-www-form-urlencoded', accept: 'text/html' },
			body: new URLSearchParams({ q1: 'a' })
		});
		expect(res.status).toBe(404);
		// Trainers may read submitted attempts (for item statistics), read only.
		const t = await sessionTrainer.fetch(`/training/attempts/${a.id}`);
		expect(t.status).toBe(200);
		expect(await t.text()).toContain(opA.displayName);
	});
});

describe('cool-down and time limit', () => {
	it('refuses a new attempt after two failures within the window, with the instant, then allows it', async () => {
		const op = await createTestPerson(['operator']);
		const t0 = new Date(Date.now() - 5 * 3_600_000);
		const at = (min: number) => new Date(t0.getTime() + min * 60_000);
		for (const m of [0, 1]) {
			const { id } = await startAttempt(op.actor, fx.processId, { now: at(m) });
			const r = await submitAttempt(op.actor, id, {}, { now: at(m) });
			expect(r.passed).toBe(false);
		}
		const err = await startAttempt(op.actor, fx.processId, {
			now: at(2),
			timeZone: PLANT_ZONE
		}).catch((e) => e);
		expect(err).toBeInstanceOf(Refusal);
		expect((err as Refusal).status).toBe(429);
		// The window of 60 minutes runs from the older of the two failures.
		const retry = at(60);
		expect((err as Refusal).message).toContain(formatLocal(retry, PLANT_ZONE));
		expect((err as Refusal).detail).toEqual({ retryAt: retry.toISOString() });
		await expect(
			startAttempt(op.actor, fx.processId, { now: new Date(retry.getTime() - 1) })
		).rejects.toThrow(/Cool-down/);
		const again = await startAttempt(op.actor, fx.processId, {
			now: new Date(retry.getTime() + 1)
		});
		expect(again.resumed).toBe(false);
	});

	it('after the deadline a submission is graded on the answers saved in time (timed_out)', async () => {
		const limited = await makeCheckFixture(trainer, quality, { timeLimitMin: 10 });
		const op = await createTestPerson(['operator']);
		const start = new Date(Date.now() - 3_600_000);
		const { id } = await startAttempt(op.actor, limited.processId, { now: start });
		const items = await itemsOf(id);
		const right = answersFor(items);
		const [first, ...rest] = items;
		// Only the first answer is saved before the deadline.
		await saveAnswers(
			op.actor,
			id,
			{ [first.position]: right[first.position] },
			{ now: new Date(start.getTime() + 5 * 60_000) }
		);
		const late = new Date(start.getTime() + 11 * 60_000);
		await expect(saveAnswers(op.actor, id, right, { now: late })).rejects.toThrow(
			/time limit has passed/
		);
		const r = await submitAttempt(op.actor, id, right, { now: late });
		expect(r).toMatchObject({ state: 'timed_out', scorePct: 20, passed: false });
		expect(rest.length).toBe(4);
	});
});

describe('item statistics', () => {
	it('counts draws and correct answers per question, most missed first, with the most common wrong answer', async () => {
		const stats = await itemStatistics(fx.checkId);
		expect(stats.length).toBeGreaterThanOrEqual(5);
		for (let k = 1; k < stats.length; k++)
			expect(stats[k].pctCorrect).toBeGreaterThanOrEqual(stats[k - 1].pctCorrect);
		const single = stats.find((s) => s.kind === 'single' && s.drawn >= 4)!;
		expect(single.drawn).toBeGreaterThanOrEqual(4);
		expect(single.pctCorrect).toBeLessThan(100);
		expect(single.mostCommonWrong).toBeTruthy();
		const res = await sessionTrainer.fetch(`/checks/${fx.checkId}/stats`);
		expect(res.status).toBe(200);
		expect(await res.text()).toContain('Most common wrong answer');
		const op = await sessionA.fetch(`/checks/${fx.checkId}/stats`);
		expect(op.status).toBe(403);
	});

	it('getAttemptView hides attempts of others from operators', async () => {
		const [a] = await db
			.select({ id: checkAttempts.id })
			.from(checkAttempts)
			.where(eq(checkAttempts.personId, opA.id))
			.limit(1);
		expect(await getAttemptView({ id: opB.id, roles: ['operator'] }, a.id)).toBeNull();
		expect(await getAttemptView({ id: opA.id, roles: ['operator'] }, a.id)).not.toBeNull();
	});
});

describe('demo knowledge checks', () => {
	it('seedChecks makes KC-COG-MB and KC-FOG-MB approved with signatures and the asked-for pools', async () => {
		const existing = await db
			.select({ id: knowledgeChecks.id })
			.from(knowledgeChecks)
			.where(eq(knowledgeChecks.code, 'KC-COG-MB'));
		if (!existing.length) {
			const { seedChecks } = await import('../../scripts/seed-checks');
			await seedChecks();
		}
		for (const code of ['KC-COG-MB', 'KC-FOG-MB']) {
			const [v] = await db
				.select({
					id: checkVersions.id,
					state: checkVersions.state,
					per: checkVersions.questionsPerAttempt
				})
				.from(checkVersions)
				.innerJoin(knowledgeChecks, eq(knowledgeChecks.id, checkVersions.checkId))
				.where(and(eq(knowledgeChecks.code, code), eq(checkVersions.state, 'approved')));
			expect(v).toMatchObject({ state: 'approved', per: 5 });
			const pool = await db
				.select({ kind: checkQuestions.kind })
				.from(checkQuestions)
				.where(eq(checkQuestions.checkVersionId, v.id));
			expect(pool.length).toBeGreaterThanOrEqual(8);
			expect(pool.length).toBeLessThanOrEqual(12);
			expect(pool.filter((q) => q.kind === 'calculated').length).toBeGreaterThanOrEqual(2);
			expect(pool.some((q) => q.kind === 'numeric')).toBe(true);
			const sig = await db
				.select({ meaning: signatures.meaning })
				.from(signatures)
				.where(and(eq(signatures.recordType, 'check_version'), eq(signatures.recordId, v.id)));
			expect(sig).toEqual([{ meaning: 'approved' }]);
		}
	});
});
