import { describe, expect, it } from 'vitest';
import { bridgeRiskSchema, computeBridgeRisk, type BridgeRiskOutput } from './bridge-risk';
import { runCalculator } from './registry';

function relativeError(actual: number, expected: number): number {
	return expected === 0 ? Math.abs(actual) : Math.abs(actual - expected) / Math.abs(expected);
}

function mulberry32(seed: number): () => number {
	let state = seed >>> 0;
	return () => {
		state = (state + 0x6d2b79f5) >>> 0;
		let t = state;
		t = Math.imul(t ^ (t >>> 15), t | 1);
		t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
		return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
	};
}

function run(input: Record<string, unknown>): { outputs: BridgeRiskOutput; warnings: string[] } {
	const result = runCalculator('bridge-risk', input);
	if (!result.ok) throw new Error(`${result.error} ${JSON.stringify(result.fields)}`);
	return result;
}

const fineGap = {
	gapDensityPerMm2: 30000,
	particleDiameterUm: 3,
	gapUm: 12,
	overlapLengthUm: 100,
	gapCount: 1200
};

describe('bridge-risk: the model of CALCULATIONS.md', () => {
	it('matches the formulas evaluated directly where no digits are lost', () => {
		// Padbridge's own model (CALCULATIONS.md), evaluated here with plain Math.pow:
		// n·d² = 30 000 × 0.003² = 0.27; m = ceil(12 / 3) = 4; R = floor(100 / 3) = 33 (by hand)
		const p = 1 - Math.exp(-0.27);
		const perGap = 1 - Math.pow(1 - Math.pow(p, 4), 33);
		const anyGap = 1 - Math.pow(1 - perGap, 1200);
		const { outputs } = run(fineGap);
		expect(outputs.cellsAcross).toBe(4);
		expect(outputs.rows).toBe(33);
		expect(outputs.gapToDiameterRatio).toBe(4);
		expect(relativeError(outputs.cellOccupancy, p)).toBeLessThan(1e-13);
		expect(relativeError(outputs.probShortPerGap, perGap)).toBeLessThan(1e-12);
		expect(relativeError(outputs.probAnyShort, anyGap)).toBeLessThan(1e-12);
	});

	it('rounds the cells across up and the rows down', () => {
		// ceil(12.1 / 3) = 5 and floor(98.9 / 3) = 32, by hand (CALCULATIONS.md)
		const { outputs } = run({ ...fineGap, gapUm: 12.1, overlapLengthUm: 98.9 });
		expect(outputs.cellsAcross).toBe(5);
		expect(outputs.rows).toBe(32);
		// 0.3 / 0.1 is 2.9999999999999996 in doubles; it is still 3 cells (common practice, no source)
		expect(run({ ...fineGap, gapUm: 0.3, particleDiameterUm: 0.1 }).outputs.cellsAcross).toBe(3);
	});

	it('stays exact for tiny probabilities', () => {
		// n·d² = 2000 × 0.003² = 0.018, m = ceil(30 / 3) = 10: p^m ≈ 3.4e-18, far below double spacing
		// near 1. To first order 1 − (1 − x)^R = R·x (binomial series, from memory); the second-order
		// terms are below 1e-15 relative here.
		const p = -Math.expm1(-0.018);
		const rowBridged = Math.pow(p, 10);
		const { outputs } = run({ ...fineGap, gapDensityPerMm2: 2000, gapUm: 30 });
		expect(relativeError(outputs.probShortPerGap, 33 * rowBridged)).toBeLessThan(1e-12);
		expect(relativeError(outputs.probAnyShort, 1200 * 33 * rowBridged)).toBeLessThan(1e-12);
		// The premise: done naively, 1 − (1 − p^m)^R is exactly 0 here
		expect(1 - Math.pow(1 - rowBridged, 33)).toBe(0);
	});

	it('gives no short without particles in the gap', () => {
		const { outputs } = run({ ...fineGap, gapDensityPerMm2: 0 });
		expect(outputs.cellOccupancy).toBe(0);
		expect(outputs.probShortPerGap).toBe(0);
		expect(outputs.probAnyShort).toBe(0);
	});

	it('warns when the gap is below three particle diameters', () => {
		// The three-diameter rule of CALCULATIONS.md: 8 µm / 3 µm = 2.67 warns, 9 µm / 3 µm = 3 does not
		expect(run({ ...fineGap, gapUm: 8 }).warnings.join(' ')).toMatch(/three particle diameters/);
		expect(run({ ...fineGap, gapUm: 9 }).warnings).toEqual([]);
	});
});

describe('bridge-risk: properties', () => {
	it('keeps probabilities in [0, 1], rising with density and falling as the gap widens', () => {
		const random = mulberry32(1993);
		for (let trial = 0; trial < 300; trial++) {
			const base = {
				gapDensityPerMm2: random() * 80000,
				particleDiameterUm: 2 + random() * 8,
				gapUm: 5 + random() * 40,
				overlapLengthUm: 20 + random() * 500,
				gapCount: 1 + Math.floor(random() * 3000)
			};
			const outputs = (input: typeof base) =>
				computeBridgeRisk(bridgeRiskSchema.parse(input)).outputs;
			const reference = outputs(base);
			const denser = outputs({ ...base, gapDensityPerMm2: base.gapDensityPerMm2 * 1.5 + 1 });
			const wider = outputs({ ...base, gapUm: base.gapUm + base.particleDiameterUm });
			for (const o of [reference, denser, wider]) {
				for (const p of [o.cellOccupancy, o.probShortPerGap, o.probAnyShort]) {
					expect(p).toBeGreaterThanOrEqual(0);
					expect(p).toBeLessThanOrEqual(1);
				}
				expect(o.probAnyShort).toBeGreaterThanOrEqual(o.probShortPerGap);
			}
			expect(denser.probShortPerGap).toBeGreaterThanOrEqual(reference.probShortPerGap);
			expect(wider.probShortPerGap).toBeLessThanOrEqual(reference.probShortPerGap);
		}
	});
});

describe('bridge-risk: validation', () => {
	it('gives a field error for each bad input', () => {
		const result = runCalculator('bridge-risk', {
			gapDensityPerMm2: -1,
			particleDiameterUm: 0,
			gapUm: '',
			overlapLengthUm: 'long',
			gapCount: 0.5
		});
		expect(result.ok).toBe(false);
		if (result.ok) return;
		expect(result.fields.gapDensityPerMm2).toMatch(/between 0 and/);
		expect(result.fields.particleDiameterUm).toMatch(/greater than 0/);
		expect(result.fields.gapUm).toMatch(/empty/);
		expect(result.fields.overlapLengthUm).toMatch(/must be a number/);
		expect(result.fields.gapCount).toMatch(/whole number/);
	});
});
