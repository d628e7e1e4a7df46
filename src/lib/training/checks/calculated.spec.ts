import { describe, expect, it } from 'vitest';
import { runCalculator } from '../../calculators/registry';
import {
	checkCalcSpec,
	computeKey,
	cornerParams,
	drawParams,
	formatParamLines,
	parseParamLines,
	rangeCount,
	rangeValue,
	renderPrompt,
	type CalcSpec
} from './calculated';

const BUMP_FORCE: CalcSpec = {
	calculatorId: 'bond-force',
	output: 'forceN',
	unit: 'N',
	tolerancePct: 2,
	params: {
		basis: { value: 'bump' },
		bumpWidthUm: { value: 18 },
		bumpLengthUm: { value: 95 },
		bumpCount: { min: 1000, max: 1300, step: 50 },
		pressureMPa: { min: 50, max: 80, step: 5 }
	}
};
const PROMPT =
	'Bumps {bumpWidthUm} × {bumpLengthUm} µm, {bumpCount} bumps, {pressureMPa} MPa on bump area: what force in N do you enter?';

describe('calculated questions', () => {
	it('the key is the calculator result for the drawn parameters', () => {
		// 1,150 × 18 µm × 95 µm = 1.9665 mm²; × 65 MPa = 127.8225 N (force = pressure × area).
		const params = { ...drawParams(BUMP_FORCE, () => 0), bumpCount: 1150, pressureMPa: 65 };
		const key = computeKey(BUMP_FORCE, params);
		expect(key).toEqual({ ok: true, value: expect.closeTo(127.8225, 9) });
		const run = runCalculator('bond-force', params);
		expect(run.ok && run.outputs.forceN).toBe(key.ok && key.value);
	});

	it('renders the prompt with grouped numbers', () => {
		expect(
			renderPrompt(PROMPT, { bumpWidthUm: 18, bumpLengthUm: 95, bumpCount: 1150, pressureMPa: 65 })
		).toBe('Bumps 18 × 95 µm, 1,150 bumps, 65 MPa on bump area: what force in N do you enter?');
	});

	it('draws only values on the step grid, ends included', () => {
		const r = { min: 0.1, max: 0.5, step: 0.1 };
		expect(rangeCount(r)).toBe(5);
		expect([0, 1, 2, 3, 4].map((k) => rangeValue(r, k))).toEqual([0.1, 0.2, 0.3, 0.4, 0.5]);
		const last = drawParams(BUMP_FORCE, (n) => n - 1);
		expect(last.bumpCount).toBe(1300);
		expect(last.pressureMPa).toBe(80);
	});

	it('accepts a sound spec and lists 2^n corners', () => {
		expect(checkCalcSpec(BUMP_FORCE, PROMPT)).toEqual({});
		expect(cornerParams(BUMP_FORCE)).toHaveLength(4);
	});

	it('refuses ranges outside the calculator input range', () => {
		const bad = {
			...BUMP_FORCE,
			params: { ...BUMP_FORCE.params, pressureMPa: { min: 0, max: 80, step: 5 } }
		};
		expect(checkCalcSpec(bad, PROMPT).params).toMatch(/pressureMPa.*leaves the calculator's range/);
	});

	it('refuses a spec whose corners the calculator refuses (a missing basis input)', () => {
		const { bumpWidthUm: _w, ...rest } = BUMP_FORCE.params;
		const errors = checkCalcSpec({ ...BUMP_FORCE, params: rest }, 'Force for {bumpCount} bumps?');
		expect(errors.params).toMatch(/refuses the corner/);
	});

	it('refuses unknown inputs, outputs, calculators and placeholders', () => {
		expect(
			checkCalcSpec({ ...BUMP_FORCE, calculatorId: 'nope' }, PROMPT).calculatorId
		).toBeTruthy();
		expect(checkCalcSpec({ ...BUMP_FORCE, output: 'speed' }, PROMPT).output).toMatch(/forceN/);
		expect(checkCalcSpec(BUMP_FORCE, PROMPT + ' {headTempC}').prompt).toMatch(/headTempC/);
		const extra = { ...BUMP_FORCE, params: { ...BUMP_FORCE.params, colour: { value: 3 } } };
		expect(checkCalcSpec(extra, PROMPT).params).toMatch(/colour/);
		const fixed = {
			...BUMP_FORCE,
			params: { ...BUMP_FORCE.params, bumpCount: { value: 1150 }, pressureMPa: { value: 65 } }
		};
		expect(checkCalcSpec(fixed, PROMPT).params).toMatch(/at least one parameter a range/);
	});

	it('reads and writes the editor parameter lines', () => {
		const text =
			'basis = bump\nbumpWidthUm = 18\nbumpLengthUm = 95\nbumpCount: 1000..1300 step 50\npressureMPa: 50..80 step 5';
		const parsed = parseParamLines(text);
		expect(parsed).toEqual({ ok: true, params: BUMP_FORCE.params });
		expect(formatParamLines(BUMP_FORCE.params)).toBe(text);
		expect(parseParamLines('bumpCount 1000').ok).toBe(false);
		expect(parseParamLines('a = 1\na = 2').ok).toBe(false);
		expect(parseParamLines('a: 1..x step 2').ok).toBe(false);
	});
});
