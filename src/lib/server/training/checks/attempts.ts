// Knowledge-check attempts: drawing questions, saving answers, grading once on the server, and
// the review afterwards. Answer keys stay in the database; nothing here returns one to a page.
import { randomInt } from 'node:crypto';
import { and, asc, desc, eq, gt, ne, sql } from 'drizzle-orm';
import { db, type Tx } from '../../db';
import {
	attemptItems,
	checkAttempts,
	checkQuestions,
	checkVersions,
	knowledgeChecks,
	people,
	processes
} from '../../db/schema';
import { recordAudit, type Actor } from '../../audit';
import { Refusal } from '../../errors';
import { ruleInForce } from '../rules';
import { evaluateAndIssue } from '../../certificates/issue';
import { faultPoint } from '../../faults';
import { formatLocal } from '../../../time';
import {
	computeKey,
	drawParams,
	renderPrompt,
	type CalcSpec
} from '../../../training/checks/calculated';
import {
	isCorrect,
	meetsPassMark,
	parseNumericAnswer,
	scorePercent,
	type AnswerKey,
	type NumericKey
} from '../../../training/checks/grading';
import type { Choice } from '../../../training/checks/question';
import type { QuestionKind } from '../../../training/vocabulary';

type SignedActor = Actor & { id: number };

/**
 * A submission this long after the deadline still counts as on time (the page's own clock, the
 * network and a slow tap). Later, the attempt is graded on the answers saved before the deadline.
 */
export const DEADLINE_GRACE_MS = 30_000;

export interface AttemptOptions {
	now?: Date;
	/** Plant time zone, for the instants in messages. */
	timeZone?: string;
}

const ZONE = 'Asia/Ho_Chi_Minh';

function shuffle<T>(list: readonly T[]): T[] {
	const out = list.slice();
	for (let i = out.length - 1; i > 0; i--) {
		const j = randomInt(i + 1);
		[out[i], out[j]] = [out[j], out[i]];
	}
	return out;
}

/** The approved version of a check, or null. */
async function approvedVersion(checkId: number, conn: Tx | typeof db = db) {
	const [v] = await conn
		.select({
			id: checkVersions.id,
			version: checkVersions.version,
			questionsPerAttempt: checkVersions.questionsPerAttempt,
			timeLimitMin: checkVersions.timeLimitMin,
			attemptsBeforeCooldown: checkVersions.attemptsBeforeCooldown,
			cooldownMin: checkVersions.cooldownMin,
			code: knowledgeChecks.code,
			title: knowledgeChecks.title
		})
		.from(checkVersions)
		.innerJoin(knowledgeChecks, eq(knowledgeChecks.id, checkVersions.checkId))
		.where(and(eq(checkVersions.checkId, checkId), eq(checkVersions.state, 'approved')));
	return v ?? null;
}

/**
 * When a person may try a check again: null when no cool-down runs. After `attemptsBeforeCooldown`
 * failed attempts within the last `cooldownMin` minutes, the next attempt waits until the oldest
 * of those failures is `cooldownMin` old.
 */
export async function cooldownUntil(
	conn: Tx | typeof db,
	personId: number,
	checkId: number,
	settings: { attemptsBeforeCooldown: number; cooldownMin: number },
	now: Date
): Promise<Date | null> {
	if (settings.cooldownMin <= 0) return null;
	const windowMs = settings.cooldownMin * 60_000;
	const failures = await conn
		.select({ submittedAt: checkAttempts.submittedAt })
		.from(checkAttempts)
		.innerJoin(checkVersions, eq(checkVersions.id, checkAttempts.checkVersionId))
		.where(
			and(
				eq(checkAttempts.personId, personId),
				eq(checkVersions.checkId, checkId),
				ne(checkAttempts.state, 'open'),
				eq(checkAttempts.passed, false),
				gt(checkAttempts.submittedAt, new Date(now.getTime() - windowMs))
			)
		)
		.orderBy(desc(checkAttempts.submittedAt));
	if (failures.length < settings.attemptsBeforeCooldown) return null;
	const nth = failures[settings.attemptsBeforeCooldown - 1].submittedAt!;
	return new Date(nth.getTime() + windowMs);
}

interface DrawnItem {
	questionId: number;
	position: number;
	params: Record<string, number> | null;
	prompt: string;
	choiceOrder: string[] | null;
	answerKey: Record<string, unknown>;
}

/** Draws `n` questions from a pool and prepares each for this attempt (choices, parameters, key). */
export function drawItems(
	pool: {
		id: number;
		kind: QuestionKind;
		prompt: string;
		choices: Choice[] | null;
		answerKey: unknown;
		calc: unknown;
	}[],
	n: number
): DrawnItem[] {
	return shuffle(pool)
		.slice(0, n)
		.map((q, k) => {
			const base = { questionId: q.id, position: k + 1 };
			if (q.kind === 'calculated') {
				const spec = q.calc as CalcSpec;
				// The ranges' corners are checked at authoring; a refused draw inside them is retried.
				for (let tries = 0; tries < 20; tries++) {
					const params = drawParams(spec, randomInt);
					const key = computeKey(spec, params);
					if (!key.ok) continue;
					const numeric = Object.fromEntries(
						Object.entries(params).filter((e): e is [string, number] => typeof e[1] === 'number')
					);
					return {
						...base,
						params: numeric,
						prompt: renderPrompt(q.prompt, params),
						choiceOrder: null,
						answerKey: {
							value: key.value,
							tolerance: spec.tolerancePct,
							toleranceKind: 'pct',
							unit: spec.unit
						} satisfies NumericKey
					};
				}
				throw new Error(`calculated question ${q.id}: no parameters the calculator accepts`);
			}
			const ids = (q.choices ?? []).map((c) => c.id);
			return {
				...base,
				params: null,
				prompt: q.prompt,
				choiceOrder: q.kind === 'true_false' ? ids : q.kind === 'numeric' ? null : shuffle(ids),
				answerKey: q.answerKey as Record<string, unknown>
			};
		});
}

/**
 * Starts an attempt at the knowledge check that the certification rule in force names for the
 * process, or resumes the person's open one. Refuses during a cool-down with the instant (plant
 * time) from which a new attempt is allowed.
 */
export async function startAttempt(
	actor: SignedActor,
	processId: number,
	opts: AttemptOptions = {}
): Promise<{ id: number; resumed: boolean }> {
	const now = opts.now ?? new Date();
	const zone = opts.timeZone ?? ZONE;
	const rule = await ruleInForce(processId, now);
	if (!rule?.checkId)
		throw new Refusal(409, 'No knowledge check is asked for this process at the moment.');
	const version = await approvedVersion(rule.checkId);
	if (!version)
		throw new Refusal(409, 'The knowledge check for this process has no approved version yet.');
	return db.transaction(async (tx) => {
		// One start at a time per person: parallel taps open one attempt, not two.
		await tx.select({ id: people.id }).from(people).where(eq(people.id, actor.id)).for('update');
		const open = await tx
			.select()
			.from(checkAttempts)
			.where(
				and(
					eq(checkAttempts.personId, actor.id),
					eq(checkAttempts.processId, processId),
					eq(checkAttempts.state, 'open')
				)
			)
			.orderBy(desc(checkAttempts.startedAt));
		for (const a of open) {
			if (a.deadlineAt && now.getTime() > a.deadlineAt.getTime() + DEADLINE_GRACE_MS) {
				await gradeAttempt(tx, actor, a, null, now);
				continue;
			}
			return { id: a.id, resumed: true };
		}
		const until = await cooldownUntil(tx, actor.id, rule.checkId!, version, now);
		if (until && until.getTime() > now.getTime())
			throw new Refusal(
				429,
				`Cool-down after ${version.attemptsBeforeCooldown} failed attempt${version.attemptsBeforeCooldown === 1 ? '' : 's'}: you can try ${version.code} again from ${formatLocal(until, zone)} (plant time). Use the time to read the instruction again.`,
				undefined,
				{ retryAt: until.toISOString() }
			);
		const pool = await tx
			.select()
			.from(checkQuestions)
			.where(eq(checkQuestions.checkVersionId, version.id));
		if (pool.length < version.questionsPerAttempt)
			throw new Refusal(
				409,
				'The question pool of this check is smaller than an attempt; tell your trainer.'
			);
		const items = drawItems(pool, version.questionsPerAttempt);
		const deadlineAt = version.timeLimitMin
			? new Date(now.getTime() + version.timeLimitMin * 60_000)
			: null;
		const [{ id }] = await tx
			.insert(checkAttempts)
			.values({
				personId: actor.id,
				checkVersionId: version.id,
				processId,
				passMarkPct: rule.passMarkPct,
				state: 'open',
				startedAt: now,
				deadlineAt
			})
			.$returningId();
		await tx.insert(attemptItems).values(items.map((i) => ({ ...i, attemptId: id })));
		await recordAudit(tx, actor, {
			action: 'attempt.started',
			entityType: 'check_attempt',
			entityId: id,
			newValues: {
				code: version.code,
				version: version.version,
				processId,
				ruleVersion: rule.version,
				passMarkPct: rule.passMarkPct,
				questions: items.map((i) => i.questionId),
				deadlineAt: deadlineAt?.toISOString() ?? null
			}
		});
		return { id, resumed: false };
	});
}

/** Responses by item position (1, 2, …): a choice id, a list of ids, or a typed number. */
export type Responses = Record<number, unknown>;

interface ItemForAnswer {
	id: number;
	position: number;
	kind: QuestionKind;
	choiceOrder: string[] | null;
}

/**
 * Keeps only responses that fit their item (a choice shown, a number as typed) and reports typed
 * numbers that are not numbers, by position.
 */
export function cleanResponses(items: readonly ItemForAnswer[], responses: Responses) {
	const clean = new Map<number, unknown>();
	const errors: Record<string, string> = {};
	for (const item of items) {
		const raw = responses[item.position];
		if (raw === undefined) continue;
		const shown = item.choiceOrder ?? [];
		if (item.kind === 'single' || item.kind === 'true_false') {
			const v = Array.isArray(raw) ? raw[0] : raw;
			clean.set(item.position, typeof v === 'string' && shown.includes(v) ? v : null);
		} else if (item.kind === 'multiple') {
			const list = (Array.isArray(raw) ? raw : [raw]).filter(
				(v): v is string => typeof v === 'string' && shown.includes(v)
			);
			clean.set(item.position, [...new Set(list)].sort());
		} else {
			const text = String(Array.isArray(raw) ? raw[0] : raw)
				.trim()
				.slice(0, 40);
			if (text !== '' && parseNumericAnswer(text) === null)
				errors[`q${item.position}`] =
					`Question ${item.position}: enter a number such as 1234.5 (a point for decimals, no thousands separator).`;
			clean.set(item.position, text === '' ? null : text);
		}
	}
	return { clean, errors };
}

async function lockOwnAttempt(tx: Tx, actor: SignedActor, attemptId: number) {
	const [a] = await tx
		.select()
		.from(checkAttempts)
		.where(eq(checkAttempts.id, attemptId))
		.for('update');
	// Somebody else's attempt reads exactly like one that does not exist.
	if (!a || a.personId !== actor.id) throw new Refusal(404, 'No such attempt.');
	return a;
}

async function itemsOf(tx: Tx, attemptId: number) {
	return tx
		.select({
			id: attemptItems.id,
			position: attemptItems.position,
			choiceOrder: attemptItems.choiceOrder,
			answerKey: attemptItems.answerKey,
			response: attemptItems.response,
			kind: checkQuestions.kind,
			points: checkQuestions.points
		})
		.from(attemptItems)
		.innerJoin(checkQuestions, eq(checkQuestions.id, attemptItems.questionId))
		.where(eq(attemptItems.attemptId, attemptId))
		.orderBy(asc(attemptItems.position));
}

const sameResponse = (a: unknown, b: unknown) =>
	JSON.stringify(a ?? null) === JSON.stringify(b ?? null);

async function storeResponses(
	tx: Tx,
	items: { id: number; position: number; response: unknown }[],
	clean: Map<number, unknown>
) {
	for (const item of items) {
		if (!clean.has(item.position)) continue;
		const next = clean.get(item.position);
		if (sameResponse(item.response, next)) continue;
		await tx.update(attemptItems).set({ response: next }).where(eq(attemptItems.id, item.id));
		item.response = next;
	}
}

const alreadySubmitted = (a: { state: string; submittedAt: Date | null }) =>
	new Refusal(
		409,
		`This attempt was already submitted${a.submittedAt ? ` (${a.submittedAt.toISOString()})` : ''} and has been graded; it is graded once.`,
		undefined,
		{ state: a.state }
	);

/** Saves answers of an open attempt before its deadline (nothing is graded). */
export async function saveAnswers(
	actor: SignedActor,
	attemptId: number,
	responses: Responses,
	opts: AttemptOptions = {}
) {
	const now = opts.now ?? new Date();
	return db.transaction(async (tx) => {
		const a = await lockOwnAttempt(tx, actor, attemptId);
		if (a.state !== 'open') throw alreadySubmitted(a);
		if (a.deadlineAt && now.getTime() > a.deadlineAt.getTime() + DEADLINE_GRACE_MS)
			throw new Refusal(
				409,
				'The time limit has passed, so answers can no longer be changed. Submit to have the answers saved before the deadline graded.'
			);
		const items = await itemsOf(tx, attemptId);
		const { clean, errors } = cleanResponses(items, responses);
		for (const k of Object.keys(errors)) clean.delete(Number(k.slice(1)));
		await storeResponses(tx, items, clean);
		return { errors };
	});
}

type AttemptRow = typeof checkAttempts.$inferSelect;

/** Grades every item of an open attempt and closes it, inside the caller's transaction. */
async function gradeAttempt(
	tx: Tx,
	actor: SignedActor,
	a: AttemptRow,
	clean: Map<number, unknown> | null,
	now: Date
) {
	const items = await itemsOf(tx, a.id);
	const late = !!a.deadlineAt && now.getTime() > a.deadlineAt.getTime() + DEADLINE_GRACE_MS;
	// After the deadline only what was saved in time counts.
	if (clean && !late) await storeResponses(tx, items, clean);
	const graded = items.map((i) => {
		const ok = isCorrect(i.kind, i.answerKey as unknown as AnswerKey, i.response);
		return { ...i, ok, awarded: ok ? i.points : 0 };
	});
	for (const g of graded)
		await tx
			.update(attemptItems)
			.set({ correct: g.ok, pointsAwarded: g.awarded })
			.where(eq(attemptItems.id, g.id));
	await faultPoint('submit-attempt');
	const scorePct = scorePercent(graded);
	const passed = meetsPassMark(scorePct, a.passMarkPct);
	const state = late ? ('timed_out' as const) : ('submitted' as const);
	const res = await tx
		.update(checkAttempts)
		.set({ state, submittedAt: now, scorePct, passed })
		.where(and(eq(checkAttempts.id, a.id), eq(checkAttempts.state, 'open')));
	if ((res as unknown as [{ affectedRows: number }])[0].affectedRows !== 1)
		throw alreadySubmitted(a);
	await recordAudit(tx, actor, {
		action: 'attempt.submitted',
		entityType: 'check_attempt',
		entityId: a.id,
		oldValues: { state: 'open' },
		newValues: {
			state,
			scorePct,
			passed,
			passMarkPct: a.passMarkPct,
			correct: graded.filter((g) => g.ok).length,
			items: graded.length,
			personId: a.personId
		}
	});
	return { state, scorePct, passed, processId: a.processId, personId: a.personId };
}

/**
 * Submits an attempt: locks its row, refuses unless it is still open, grades every item on the
 * server and closes it, all in one transaction, so two parallel submissions grade once (the second
 * gets a 409). A submission after the deadline is graded on the answers saved in time (timed_out).
 */
export async function submitAttempt(
	actor: SignedActor,
	attemptId: number,
	responses: Responses | null,
	opts: AttemptOptions = {}
) {
	const now = opts.now ?? new Date();
	const result = await db.transaction(async (tx) => {
		const a = await lockOwnAttempt(tx, actor, attemptId);
		if (a.state !== 'open') throw alreadySubmitted(a);
		let clean: Map<number, unknown> | null = null;
		if (responses) {
			const items = await itemsOf(tx, attemptId);
			const checked = cleanResponses(items, responses);
			const late = !!a.deadlineAt && now.getTime() > a.deadlineAt.getTime() + DEADLINE_GRACE_MS;
			if (Object.keys(checked.errors).length && !late)
				throw new Refusal(
					400,
					'Some answers are not numbers; nothing was submitted.',
					checked.errors
				);
			clean = checked.clean;
		}
		return gradeAttempt(tx, actor, a, clean, now);
	});
	await afterGrading(actor, result);
	return result;
}

/**
 * After a passed attempt has committed, the certification rule may now be met: issue the
 * certificate. The grade stands whatever happens here, so a failure is logged (with the attempt's
 * person and process) rather than shown as a failed submission.
 */
async function afterGrading(
	actor: SignedActor,
	result: { passed: boolean; personId: number; processId: number }
) {
	if (!result.passed) return;
	try {
		await evaluateAndIssue(result.personId, result.processId, { actor });
	} catch (err) {
		console.error(
			`certificate evaluation after a passed attempt failed (person ${result.personId}, process ${result.processId})`,
			err
		);
	}
}

export interface AttemptItemView {
	position: number;
	kind: QuestionKind;
	prompt: string;
	points: number;
	/** Choices in this attempt's order (ids and texts only). */
	choices: Choice[];
	/** The unit shown beside a numeric answer. */
	unit: string | null;
	response: unknown;
	/** After submission only: whether the answer was right (never what the right answer is). */
	outcome: 'right' | 'wrong' | null;
	/** After submission, for wrong answers only. */
	explanation: string | null;
}

/**
 * One attempt as its person sees it (trainers and quality may read submitted attempts of others).
 * Never carries an answer key: before submission nothing about correctness, afterwards the score,
 * which items were wrong and the trainer's explanation for those.
 */
export async function getAttemptView(
	viewer: { id: number; roles: readonly string[] },
	attemptId: number
) {
	const [a] = await db
		.select({
			id: checkAttempts.id,
			personId: checkAttempts.personId,
			personName: people.displayName,
			state: checkAttempts.state,
			startedAt: checkAttempts.startedAt,
			deadlineAt: checkAttempts.deadlineAt,
			submittedAt: checkAttempts.submittedAt,
			scorePct: checkAttempts.scorePct,
			passed: checkAttempts.passed,
			passMarkPct: checkAttempts.passMarkPct,
			processId: checkAttempts.processId,
			processCode: processes.code,
			code: knowledgeChecks.code,
			title: knowledgeChecks.title,
			version: checkVersions.version
		})
		.from(checkAttempts)
		.innerJoin(people, eq(people.id, checkAttempts.personId))
		.innerJoin(processes, eq(processes.id, checkAttempts.processId))
		.innerJoin(checkVersions, eq(checkVersions.id, checkAttempts.checkVersionId))
		.innerJoin(knowledgeChecks, eq(knowledgeChecks.id, checkVersions.checkId))
		.where(eq(checkAttempts.id, attemptId));
	if (!a) return null;
	const own = a.personId === viewer.id;
	const reviewer = viewer.roles.includes('trainer') || viewer.roles.includes('quality');
	if (!own && !(reviewer && a.state !== 'open')) return null;
	const rows = await db
		.select({
			position: attemptItems.position,
			prompt: attemptItems.prompt,
			choiceOrder: attemptItems.choiceOrder,
			response: attemptItems.response,
			correct: attemptItems.correct,
			kind: checkQuestions.kind,
			points: checkQuestions.points,
			choices: checkQuestions.choices,
			explanation: checkQuestions.explanation,
			// Only the unit is read out of the key, in SQL, so the key itself never leaves the database.
			unit: sql<string | null>`JSON_UNQUOTE(JSON_EXTRACT(${attemptItems.answerKey}, '$.unit'))`
		})
		.from(attemptItems)
		.innerJoin(checkQuestions, eq(checkQuestions.id, attemptItems.questionId))
		.where(eq(attemptItems.attemptId, attemptId))
		.orderBy(asc(attemptItems.position));
	const done = a.state !== 'open';
	const items: AttemptItemView[] = rows.map((r) => {
		const byId = new Map((r.choices ?? []).map((c) => [c.id, c.text]));
		const unit = r.kind === 'numeric' || r.kind === 'calculated' ? (r.unit ?? '') : null;
		return {
			position: r.position,
			kind: r.kind,
			prompt: r.prompt,
			points: r.points,
			choices: (r.choiceOrder ?? []).map((id) => ({ id, text: byId.get(id) ?? '' })),
			unit,
			response: r.response ?? null,
			outcome: done ? (r.correct ? 'right' : 'wrong') : null,
			explanation: done && !r.correct ? (r.explanation ?? null) : null
		};
	});
	const { personId: _p, processId: _pr, ...shown } = a;
	return { ...shown, own, items };
}

/**
 * The checks a person is asked to pass: for each process whose rule in force names a check with
 * an approved version, the person's open attempt, recent results and any cool-down.
 */
export async function listChecksForPerson(personId: number, now: Date = new Date()) {
	const procs = await db
		.select({ id: processes.id, code: processes.code, name: processes.name })
		.from(processes)
		.where(eq(processes.active, true))
		.orderBy(asc(processes.code));
	const out = [];
	for (const p of procs) {
		const rule = await ruleInForce(p.id, now);
		if (!rule?.checkId) continue;
		const version = await approvedVersion(rule.checkId);
		if (!version) continue;
		const attempts = await db
			.select({
				id: checkAttempts.id,
				state: checkAttempts.state,
				startedAt: checkAttempts.startedAt,
				submittedAt: checkAttempts.submittedAt,
				scorePct: checkAttempts.scorePct,
				passed: checkAttempts.passed,
				deadlineAt: checkAttempts.deadlineAt
			})
			.from(checkAttempts)
			.where(and(eq(checkAttempts.personId, personId), eq(checkAttempts.processId, p.id)))
			.orderBy(desc(checkAttempts.startedAt))
			.limit(10);
		out.push({
			processId: p.id,
			processCode: p.code,
			processName: p.name,
			code: version.code,
			title: version.title,
			version: version.version,
			questionsPerAttempt: version.questionsPerAttempt,
			timeLimitMin: version.timeLimitMin,
			passMarkPct: rule.passMarkPct,
			open: attempts.find((a) => a.state === 'open') ?? null,
			attempts: attempts.filter((a) => a.state !== 'open'),
			retryAt: await cooldownUntil(db, personId, rule.checkId, version, now)
		});
	}
	return out;
}
