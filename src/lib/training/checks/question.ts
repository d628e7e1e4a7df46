// A knowledge-check question as stored (kind, prompt, choices, key or calculator spec), built from
// the editor's plain form and turned back into it. Pure: no server imports.
import type { QuestionForm } from '../../schemas/checks';
import type { QuestionKind } from '../vocabulary';
import { checkCalcSpec, formatParamLines, parseParamLines, type CalcSpec } from './calculated';
import { parseNumericAnswer, type AnswerKey, type NumericKey } from './grading';

export interface Choice {
	id: string;
	text: string;
}

export interface QuestionData {
	kind: QuestionKind;
	prompt: string;
	explanation: string | null;
	points: number;
	choices: Choice[] | null;
	/** null for calculated questions: their key is computed per attempt. */
	answerKey: AnswerKey | null;
	calc: CalcSpec | null;
}

export const TRUE_FALSE_CHOICES: Choice[] = [
	{ id: 'true', text: 'True' },
	{ id: 'false', text: 'False' }
];

const CHOICE_IDS = ['a', 'b', 'c', 'd', 'e', 'f'];

export type BuildResult =
	| { ok: true; question: QuestionData }
	| { ok: false; errors: Partial<Record<keyof QuestionForm, string>> };

/** Validates the editor's fields for the chosen kind and builds the stored question. */
export function buildQuestion(f: QuestionForm): BuildResult {
	const errors: Partial<Record<keyof QuestionForm, string>> = {};
	const base = {
		kind: f.kind,
		prompt: f.prompt,
		explanation: f.explanation || null,
		points: f.points
	};
	if (f.kind === 'single' || f.kind === 'multiple') {
		// Positions of the filled-in boxes keep their letter, so "correct" refers to what was typed.
		const filled = f.choices
			.map((text, k) => ({ id: CHOICE_IDS[k], text }))
			.filter((c) => c.text !== '');
		const correct = [...new Set(f.correct)].filter((id) => filled.some((c) => c.id === id));
		if (filled.length < 2) errors.choices = 'Give at least two choices.';
		else if (new Set(filled.map((c) => c.text.toLocaleLowerCase())).size !== filled.length)
			errors.choices = 'Two choices read the same.';
		if (f.kind === 'single' && correct.length !== 1)
			errors.correct = 'Mark exactly one choice as correct.';
		if (f.kind === 'multiple' && correct.length < 1)
			errors.correct = 'Mark at least one choice as correct.';
		if (Object.keys(errors).length) return { ok: false, errors };
		return {
			ok: true,
			question: {
				...base,
				choices: filled,
				answerKey: f.kind === 'single' ? { correct: correct[0] } : { correct: correct.sort() },
				calc: null
			}
		};
	}
	if (f.kind === 'true_false') {
		if (!f.trueFalse)
			return { ok: false, errors: { trueFalse: 'Choose whether the statement is true or false.' } };
		return {
			ok: true,
			question: {
				...base,
				choices: TRUE_FALSE_CHOICES,
				answerKey: { correct: f.trueFalse },
				calc: null
			}
		};
	}
	if (f.kind === 'numeric') {
		const value = parseNumericAnswer(f.value);
		const tolerance = parseNumericAnswer(f.tolerance);
		if (value === null) errors.value = 'Give the correct value as a number.';
		if (tolerance === null || tolerance < 0)
			errors.tolerance = 'Give the tolerance as a number ≥ 0.';
		else if (f.toleranceKind === 'pct' && tolerance > 50)
			errors.tolerance = 'A tolerance above 50 % accepts almost anything.';
		if (!f.unit) errors.unit = 'Give the unit shown beside the answer (e.g. N, MPa, °C, min).';
		if (Object.keys(errors).length) return { ok: false, errors };
		const key: NumericKey = {
			value: value!,
			tolerance: tolerance!,
			toleranceKind: f.toleranceKind,
			unit: f.unit
		};
		return { ok: true, question: { ...base, choices: null, answerKey: key, calc: null } };
	}
	// calculated
	const parsed = parseParamLines(f.params);
	const tolerancePct = parseNumericAnswer(f.tolerancePct);
	if (!parsed.ok) errors.params = parsed.error;
	if (tolerancePct === null) errors.tolerancePct = 'Give the tolerance in % as a number.';
	if (!f.unit) errors.unit = 'Give the unit shown beside the answer.';
	if (Object.keys(errors).length || !parsed.ok) return { ok: false, errors };
	const calc: CalcSpec = {
		calculatorId: f.calculatorId,
		output: f.output,
		unit: f.unit,
		tolerancePct: tolerancePct!,
		params: parsed.params
	};
	const problems = checkCalcSpec(calc, f.prompt);
	if (Object.keys(problems).length) return { ok: false, errors: problems };
	return { ok: true, question: { ...base, choices: null, answerKey: null, calc } };
}

/** The editor's fields for a stored question (the inverse of buildQuestion). */
export function questionToForm(q: QuestionData): QuestionForm {
	const key = q.answerKey as Record<string, unknown> | null;
	const choices = (q.kind === 'single' || q.kind === 'multiple' ? (q.choices ?? []) : []).map(
		(c) => c.text
	);
	const correct = key && 'correct' in key ? ([] as string[]).concat(key.correct as string) : [];
	const numeric = q.kind === 'numeric' ? (key as unknown as NumericKey) : null;
	return {
		kind: q.kind,
		prompt: q.prompt,
		explanation: q.explanation ?? '',
		points: q.points,
		choices,
		correct: q.kind === 'true_false' ? [] : correct,
		trueFalse: q.kind === 'true_false' ? (correct[0] as 'true' | 'false') : '',
		value: numeric ? String(numeric.value) : '',
		unit: numeric?.unit ?? q.calc?.unit ?? '',
		tolerance: numeric ? String(numeric.tolerance) : '',
		toleranceKind: numeric?.toleranceKind ?? 'pct',
		calculatorId: q.calc?.calculatorId ?? '',
		output: q.calc?.output ?? '',
		tolerancePct: q.calc ? String(q.calc.tolerancePct) : '',
		params: q.calc ? formatParamLines(q.calc.params) : ''
	};
}
