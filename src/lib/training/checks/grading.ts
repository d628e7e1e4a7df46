// Grading of one knowledge-check item against its stored key. Pure: the server grades with it
// (the browser never sees a key), and the unit specs pin the tolerance edges.

export type ToleranceKind = 'abs' | 'pct';

export interface ChoiceKey {
	correct: string;
}
export interface MultipleKey {
	correct: string[];
}
export interface NumericKey {
	value: number;
	tolerance: number;
	toleranceKind: ToleranceKind;
	unit: string;
}
export type AnswerKey = ChoiceKey | MultipleKey | NumericKey;

export type GradedKind = 'single' | 'multiple' | 'true_false' | 'numeric' | 'calculated';

// Decimal notation only (no hex, no 'Infinity'); a comma is not read as a decimal point because
// "1,150" is a thousands separator as often as a decimal comma.
const DECIMAL = /^[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?$/;

/** The number in a typed answer, or null when it is not a plain decimal number. */
export function parseNumericAnswer(raw: unknown): number | null {
	if (typeof raw === 'number') return Number.isFinite(raw) ? raw : null;
	if (typeof raw !== 'string') return null;
	const text = raw.trim().replace(/\s+/g, '');
	if (!DECIMAL.test(text)) return null;
	const n = Number(text);
	return Number.isFinite(n) ? n : null;
}

/** Half-width of the accepted band around `value`. */
export function toleranceBand(key: NumericKey): number {
	return key.toleranceKind === 'pct' ? (Math.abs(key.value) * key.tolerance) / 100 : key.tolerance;
}

/**
 * Whether `answer` lies within the key's tolerance. The band's edges count as correct; a relative
 * slack of 1e-9 absorbs binary rounding so that 105 against 100 ± 5 % is inside, not just outside.
 */
export function withinTolerance(answer: number, key: NumericKey): boolean {
	const band = toleranceBand(key);
	const slack = 1e-9 * Math.max(1, Math.abs(key.value), band);
	return Math.abs(answer - key.value) <= band + slack;
}

/** Whether a response answers the item correctly. Missing or malformed responses are wrong. */
export function isCorrect(kind: GradedKind, key: AnswerKey, response: unknown): boolean {
	switch (kind) {
		case 'single':
		case 'true_false':
			return typeof response === 'string' && response === (key as ChoiceKey).correct;
		case 'multiple': {
			if (!Array.isArray(response)) return false;
			const given = new Set(response.filter((r): r is string => typeof r === 'string'));
			const wanted = new Set((key as MultipleKey).correct);
			return given.size === wanted.size && [...wanted].every((c) => given.has(c));
		}
		case 'numeric':
		case 'calculated': {
			const n = parseNumericAnswer(response);
			return n !== null && withinTolerance(n, key as NumericKey);
		}
	}
}

/** Score in percent (two decimals) from points awarded over points possible. */
export function scorePercent(items: readonly { points: number; awarded: number }[]): number {
	const possible = items.reduce((s, i) => s + i.points, 0);
	if (possible === 0) return 0;
	const awarded = items.reduce((s, i) => s + i.awarded, 0);
	return Math.round((awarded / possible) * 10_000) / 100;
}

/** Whether a score meets the pass mark (the mark itself passes). */
export function meetsPassMark(scorePct: number, passMarkPct: number): boolean {
	return scorePct + 1e-9 >= passMarkPct;
}
