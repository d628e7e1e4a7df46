// Fixtures for knowledge checks: a process of its own with a certification rule naming a check,
// the check written by a test trainer and approved by a test quality engineer through the real
// workflow, so tests never disturb the demo plant.
import { db } from '../../src/lib/server/db/index';
import { certificationRules, processes } from '../../src/lib/server/db/schema/index';
import {
	approveVersion,
	createCheck,
	saveQuestion,
	submitVersion,
	updateVersionSettings
} from '../../src/lib/server/training/checks/index';
import { questionFormSchema, type VersionSettings } from '../../src/lib/schemas/checks';
import { buildQuestion } from '../../src/lib/training/checks/question';
import { uniq, type TestPerson } from './instruction-fixtures';

/** Distinctive key values, so a test can search response bodies for them. */
export const NUMERIC_KEY = '4242.4242';
export const EXPLAIN = (n: number) => `EXPLANATION-${n}-only-after-submission`;

/** One question of each kind; the calculated one varies bump count and pressure. */
export const POOL: Record<string, unknown>[] = [
	{
		kind: 'single',
		prompt: 'Single: which thaw?',
		choices: ['Open at once', 'Wait the thaw time', 'Heat on the stage'],
		correct: ['b'],
		explanation: EXPLAIN(1)
	},
	{
		kind: 'multiple',
		prompt: 'Multiple: which belong to a buffer change?',
		choices: ['Raise and lock the head', 'Let it cool', 'Spray IPA on the head'],
		correct: ['a', 'b'],
		explanation: EXPLAIN(2)
	},
	{
		kind: 'true_false',
		prompt: 'True/false: PTFE can give off fumes when overheated.',
		trueFalse: 'true',
		explanation: EXPLAIN(3)
	},
	{
		kind: 'numeric',
		prompt: 'Numeric: enter the distinctive value.',
		value: NUMERIC_KEY,
		unit: 'N',
		tolerance: '0.5',
		toleranceKind: 'abs',
		explanation: EXPLAIN(4)
	},
	{
		kind: 'calculated',
		prompt:
			'Calculated: bumps {bumpWidthUm} × {bumpLengthUm} µm, {bumpCount} bumps, {pressureMPa} MPa on bump area: force in N?',
		calculatorId: 'bond-force',
		output: 'forceN',
		unit: 'N',
		tolerancePct: '2',
		params:
			'basis = bump\nbumpWidthUm = 18\nbumpLengthUm = 95\nbumpCount: 1000..1300 step 50\npressureMPa: 50..80 step 5',
		explanation: EXPLAIN(5)
	}
];

export async function addQuestions(author: TestPerson, versionId: number, pool = POOL) {
	for (const raw of pool) {
		const built = buildQuestion(questionFormSchema.parse(raw));
		if (!built.ok) throw new Error(JSON.stringify(built.errors));
		await saveQuestion(author.actor, versionId, null, built.question);
	}
}

/**
 * A test process with a rule in force (since `ruleFrom`) naming a new check, version 1 approved.
 * Every attempt draws the whole pool of five, one question of each kind.
 */
export async function makeCheckFixture(
	trainer: TestPerson,
	quality: TestPerson,
	settings: Partial<VersionSettings> = {},
	ruleFrom = new Date(Date.now() - 7 * 86_400_000)
) {
	const tag = uniq().toUpperCase();
	const [{ id: processId }] = await db
		.insert(processes)
		.values({ code: `T-${tag}`, name: `Test process ${tag}`, bondType: 'COG' })
		.$returningId();
	const { id: checkId, versionId } = await createCheck(trainer.actor, {
		code: `KC-T${tag.slice(0, 7)}`,
		title: `Test check ${tag}`,
		processId
	});
	await updateVersionSettings(trainer.actor, versionId, {
		questionsPerAttempt: 5,
		timeLimitMin: null,
		attemptsBeforeCooldown: 2,
		cooldownMin: 60,
		revisionId: null,
		...settings
	});
	await addQuestions(trainer, versionId);
	await submitVersion(trainer.actor, versionId);
	await approveVersion(quality.actor, versionId, { password: quality.password });
	await db.insert(certificationRules).values({
		processId,
		version: 1,
		checkId,
		passMarkPct: 80,
		practicalRequired: true,
		reminderDays: [30, 7],
		createdBy: quality.id,
		activeFrom: ruleFrom
	});
	return { processId, checkId, versionId, code: `KC-T${tag.slice(0, 7)}` };
}
