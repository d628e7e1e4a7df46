import { describe, expect, it } from 'vitest';
import {
	isCorrect,
	meetsPassMark,
	parseNumericAnswer,
	scorePercent,
	withinTolerance,
	type NumericKey
} from './grading';

const pct = (value: number, tolerance: number): NumericKey => ({
	value,
	tolerance,
	toleranceKind: 'pct',
	unit: 'N'
});
const abs = (value: number, tolerance: number): NumericKey => ({
	value,
	tolerance,
	toleranceKind: 'abs',
	unit: 'min'
});

describe('numeric tolerance', () => {
	it('accepts both edges of a percentage band and refuses just outside', () => {
		expect(withinTolerance(105, pct(100, 5))).toBe(true);
		expect(withinTolerance(95, pct(100, 5))).toBe(true);
		expect(withinTolerance(105.01, pct(100, 5))).toBe(false);
		expect(withinTolerance(94.99, pct(100, 5))).toBe(false);
	});

	it('accepts both edges of an absolute band and refuses just outside', () => {
		expect(withinTolerance(62, abs(60, 2))).toBe(true);
		expect(withinTolerance(58, abs(60, 2))).toBe(true);
		expect(withinTolerance(62.001, abs(60, 2))).toBe(false);
		expect(withinTolerance(57.999, abs(60, 2))).toBe(false);
	});

	it('treats binary rounding at the edge as inside (0.1 + 0.2 against 0.3 ± 0)', () => {
		expect(withinTolerance(0.1 + 0.2, abs(0.3, 0))).toBe(true);
		expect(withinTolerance(0.31, abs(0.3, 0))).toBe(false);
	});

	it('uses the size of a negative key for a percentage band', () => {
		expect(withinTolerance(-10.5, pct(-10, 5))).toBe(true);
		expect(withinTolerance(-10.6, pct(-10, 5))).toBe(false);
	});

	it('reads plain decimals only', () => {
		expect(parseNumericAnswer(' 1 150.5 ')).toBe(1150.5);
		expect(parseNumericAnswer('1.2e3')).toBe(1200);
		expect(parseNumericAnswer('1,150')).toBeNull();
		expect(parseNumericAnswer('0x10')).toBeNull();
		expect(parseNumericAnswer('Infinity')).toBeNull();
		expect(parseNumericAnswer('')).toBeNull();
		expect(parseNumericAnswer(null)).toBeNull();
	});
});

describe('isCorrect per kind', () => {
	it('single and true/false need the one right id', () => {
		expect(isCorrect('single', { correct: 'b' }, 'b')).toBe(true);
		expect(isCorrect('single', { correct: 'b' }, 'a')).toBe(false);
		expect(isCorrect('single', { correct: 'b' }, null)).toBe(false);
		expect(isCorrect('true_false', { correct: 'false' }, 'false')).toBe(true);
		expect(isCorrect('true_false', { correct: 'false' }, 'true')).toBe(false);
	});

	it('multiple needs exactly the right set, in any order', () => {
		const key = { correct: ['a', 'c'] };
		expect(isCorrect('multiple', key, ['c', 'a'])).toBe(true);
		expect(isCorrect('multiple', key, ['a'])).toBe(false);
		expect(isCorrect('multiple', key, ['a', 'b', 'c'])).toBe(false);
		expect(isCorrect('multiple', key, 'a')).toBe(false);
		expect(isCorrect('multiple', key, [])).toBe(false);
	});

	it('numeric and calculated grade typed numbers within the tolerance', () => {
		expect(isCorrect('numeric', abs(24, 1), '25')).toBe(true);
		expect(isCorrect('numeric', abs(24, 1), '25.5')).toBe(false);
		expect(isCorrect('calculated', pct(111.15, 2), '113.373')).toBe(true);
		expect(isCorrect('calculated', pct(111.15, 2), '113.4')).toBe(false);
		expect(isCorrect('calculated', pct(111.15, 2), 'about 111')).toBe(false);
	});
});

describe('score', () => {
	it('weights by points and rounds to two decimals', () => {
		expect(
			scorePercent([
				{ points: 1, awarded: 1 },
				{ points: 2, awarded: 0 }
			])
		).toBe(33.33);
		expect(scorePercent([])).toBe(0);
	});

	it('passes at the mark itself', () => {
		expect(meetsPassMark(80, 80)).toBe(true);
		expect(meetsPassMark(79.99, 80)).toBe(false);
	});
});
