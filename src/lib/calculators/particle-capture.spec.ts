import poissonCdf from '@stdlib/stats-base-dists-poisson-cdf';
import jStat from 'jstat';
import { describe, expect, it } from 'vitest';
import {
	computeParticleCapture,
	densityFromVolumeFraction,
	particleCaptureSchema,
	poissonPmf,
	poissonSplit,
	probabilityAnyBelow,
	type ParticleCaptureOutput
} from './particle-capture';
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

function run(input: Record<string, unknown>): {
	outputs: ParticleCaptureOutput;
	warnings: string[];
} {
	const result = runCalculator('particle-capture', input);
	if (!result.ok) throw new Error(`${result.error} ${JSON.stringify(result.fields)}`);
	return result;
}

function fieldsOf(input: Record<string, unknown>): Record<string, string> {
	const result = runCalculator('particle-capture', input);
	expect(result.ok).toBe(false);
	return result.ok ? {} : result.fields;
}

// 25 000 pcs/mm² × (20 µm × 100 µm = 0.002 mm²) × 0.1 = 5 particles per bump, by hand
const lambdaFive = {
	densityPerMm2: 25000,
	bumpWidthUm: 20,
	bumpLengthUm: 100,
	captureRatio: 0.1,
	minParticles: 3,
	bumpCount: 1
};

const lambdas = [1e-6, 1e-3, 0.05, 0.3, 1, 2.5, 5, 7.5, 10, 20, 35, 50, 100, 200, 300];

describe('particle-capture: Poisson table values', () => {
	it('gives P(N = 0) and P(N < 3) for λ = 5', () => {
		// λ = 5: P(N = 0) = 6.737947e-3 and P(N < 3) = 0.1246520 (any Poisson table; CALCULATIONS.md)
		expect(poissonPmf(5, 0)[0]).toBeCloseTo(6.737947e-3, 9);
		expect(poissonSplit(5, 1).below).toBeCloseTo(6.737947e-3, 9);
		expect(poissonSplit(5, 3).below).toBeCloseTo(0.124652, 7);
		const { outputs } = run(lambdaFive);
		expect(outputs.meanPerBump).toBeCloseTo(5, 12);
		expect(outputs.probBumpBelowMin).toBeCloseTo(0.124652, 7);
		// One bump: P(any) is P itself
		expect(relativeError(outputs.probAnyBumpBelowMin, outputs.probBumpBelowMin)).toBeLessThan(
			1e-14
		);
	});
});

describe('particle-capture: Poisson sums against jstat and @stdlib', () => {
	it('matches the pmf of jstat over a grid of λ and k', () => {
		for (const lambda of lambdas) {
			const pmf = poissonPmf(lambda, 60);
			for (let k = 0; k <= 60; k++) {
				// Reference: jStat.poisson.pdf (jstat 1.9.6)
				const reference = jStat.poisson.pdf(k, lambda);
				if (reference < 1e-300) continue;
				expect(relativeError(pmf[k], reference), `λ=${lambda} k=${k}`).toBeLessThan(1e-11);
			}
		}
	});

	it('matches P(N < k_min) of @stdlib and jstat over a grid of λ and k_min', () => {
		for (const lambda of lambdas) {
			for (let kMin = 1; kMin <= 40; kMin++) {
				const { below } = poissonSplit(lambda, kMin);
				// Reference: @stdlib/stats-base-dists-poisson-cdf 0.3.1 at k_min − 1
				const stdlib = poissonCdf(kMin - 1, lambda);
				// Reference: jStat.poisson.cdf (jstat 1.9.6)
				const jstat = jStat.poisson.cdf(kMin - 1, lambda);
				const where = `λ=${lambda} k_min=${kMin}`;
				if (stdlib > 1e-300) expect(relativeError(below, stdlib), where).toBeLessThan(1e-11);
				if (jstat > 1e-300) expect(relativeError(below, jstat), where).toBeLessThan(1e-11);
			}
		}
	});

	it('keeps the upper tail exact where P(N < k_min) is close to 1', () => {
		for (const lambda of [1e-6, 1e-3, 0.05, 0.3, 1]) {
			for (let kMin = 1; kMin <= 12; kMin++) {
				const { atLeast } = poissonSplit(lambda, kMin);
				// Reference: the tail summed from jStat.poisson.pdf (jstat 1.9.6), smallest terms first
				let tail = 0;
				for (let k = kMin + 80; k >= kMin; k--) tail += jStat.poisson.pdf(k, lambda);
				if (tail < 1e-300) continue;
				expect(relativeError(atLeast, tail), `λ=${lambda} k_min=${kMin}`).toBeLessThan(1e-11);
			}
		}
	});

	it('keeps P(any of N bumps) exact for tiny per-bump probabilities', () => {
		// λ = 40, k_min = 3: P ≈ 3.6e-15, near the spacing of doubles just below 1, so 1 − (1 − P)^N
		// done naively loses digits; the binomial series N·P − N(N−1)P²/2 is exact here (from memory).
		const perBump = poissonCdf(2, 40); // @stdlib/stats-base-dists-poisson-cdf
		const count = 2000;
		const series = count * perBump - ((count * (count - 1)) / 2) * perBump ** 2;
		expect(relativeError(probabilityAnyBelow(40, 3, count), series)).toBeLessThan(1e-12);
		// The premise of the test: the naive form is visibly off here
		expect(relativeError(1 - (1 - perBump) ** count, series)).toBeGreaterThan(1e-4);
	});

	it('sums the pmf to 1 and never leaves [0, 1]', () => {
		for (const lambda of lambdas) {
			const pmf = poissonPmf(lambda, Math.ceil(lambda + 40 * Math.sqrt(lambda) + 40));
			expect(pmf.every((p) => p >= 0 && p <= 1)).toBe(true);
			// Normalisation of the Poisson distribution (from memory); log-space terms near λ = 300
			// carry about 1e-13 relative error each, hence 1e-10 here rather than machine precision
			expect(Math.abs(pmf.reduce((sum, p) => sum + p, 0) - 1)).toBeLessThan(1e-10);
		}
	});
});

describe('particle-capture: density', () => {
	it('derives the density from volume fraction, film thickness and particle diameter', () => {
		// n₀ = φ·t / (π d³ / 6) (CALCULATIONS.md): 10 %, 20 µm, 3 µm → 0.1 · 20 / (4.5 π) per µm²
		const expected = ((0.1 * 20) / (4.5 * Math.PI)) * 1e6;
		expect(relativeError(densityFromVolumeFraction(10, 20, 3), expected)).toBeLessThan(1e-14);
		const { outputs } = run({
			volumeFractionPct: 10,
			filmThicknessUm: 20,
			particleDiameterUm: 3,
			bumpWidthUm: 20,
			bumpLengthUm: 100,
			captureRatio: 0.3,
			minParticles: 3,
			bumpCount: 1000
		});
		expect(relativeError(outputs.densityPerMm2, expected)).toBeLessThan(1e-14);
		// λ = n₀ · A · c (CALCULATIONS.md), evaluated by hand with A = 0.002 mm², c = 0.3
		expect(relativeError(outputs.meanPerBump, expected * 0.002 * 0.3)).toBeLessThan(1e-14);
	});

	it('finds the smallest density that meets the target', () => {
		const input = { ...lambdaFive, densityPerMm2: 30000, bumpCount: 1500, targetProbability: 1e-3 };
		const { outputs } = run(input);
		const required = outputs.requiredDensityPerMm2 as number;
		expect(required).toBeGreaterThan(0);
		// Checked on the exact function: λ = n₀ · A · c with A · c = 0.002 mm² × 0.1
		const probAt = (density: number) => probabilityAnyBelow(density * 0.0002, 3, 1500);
		expect(probAt(required)).toBeLessThanOrEqual(1e-3);
		expect(probAt(required * (1 - 1e-9))).toBeGreaterThan(1e-3);
		// And through the calculator itself, at that density
		const atRequired = run({ ...input, densityPerMm2: required }).outputs.probAnyBumpBelowMin;
		expect(relativeError(atRequired, 1e-3)).toBeLessThan(1e-8);
	});

	it('gives no required density without a target', () => {
		expect(run(lambdaFive).outputs.requiredDensityPerMm2).toBeUndefined();
	});
});

describe('particle-capture: properties', () => {
	it('keeps probabilities in [0, 1], falling as density rises', () => {
		const random = mulberry32(2005);
		for (let trial = 0; trial < 300; trial++) {
			const base = {
				bumpWidthUm: 5 + random() * 60,
				bumpLengthUm: 10 + random() * 150,
				captureRatio: 0.05 + random() * 0.9,
				minParticles: 1 + Math.floor(random() * 8),
				bumpCount: 1 + Math.floor(random() * 5000)
			};
			const low = 100 + random() * 50000;
			const high = low * (1 + random() * 2);
			const a = computeParticleCapture(
				particleCaptureSchema.parse({ ...base, densityPerMm2: low })
			);
			const b = computeParticleCapture(
				particleCaptureSchema.parse({ ...base, densityPerMm2: high })
			);
			for (const outputs of [a.outputs, b.outputs]) {
				for (const p of [outputs.probBumpBelowMin, outputs.probAnyBumpBelowMin]) {
					expect(p).toBeGreaterThanOrEqual(0);
					expect(p).toBeLessThanOrEqual(1);
				}
				// A part fails at least as often as any one of its bumps
				expect(outputs.probAnyBumpBelowMin).toBeGreaterThanOrEqual(outputs.probBumpBelowMin);
			}
			expect(b.outputs.probBumpBelowMin).toBeLessThanOrEqual(a.outputs.probBumpBelowMin);
			expect(b.outputs.probAnyBumpBelowMin).toBeLessThanOrEqual(a.outputs.probAnyBumpBelowMin);
		}
	});
});

describe('particle-capture: validation', () => {
	it('refuses a capture ratio above 1 and other out-of-range values', () => {
		const fields = fieldsOf({
			...lambdaFive,
			captureRatio: 1.2,
			minParticles: 2.5,
			bumpWidthUm: 0,
			bumpCount: -3,
			targetProbability: 1
		});
		expect(fields.captureRatio).toBe('Capture ratio must be between 0 and 1');
		expect(fields.minParticles).toMatch(/whole number/);
		expect(fields.bumpWidthUm).toMatch(/greater than 0/);
		expect(fields.bumpCount).toMatch(/between 1 and/);
		expect(fields.targetProbability).toBe('Target probability must be between 0 and 1');
	});

	it('asks for exactly one way to give the density', () => {
		const both = fieldsOf({ ...lambdaFive, volumeFractionPct: 10 });
		expect(both.densityPerMm2).toMatch(/not both/);
		const neither = fieldsOf({ ...lambdaFive, densityPerMm2: undefined });
		expect(neither.densityPerMm2).toMatch(/Enter the particle density/);
		const partial = fieldsOf({ ...lambdaFive, densityPerMm2: '', volumeFractionPct: 10 });
		expect(Object.keys(partial).sort()).toEqual(['filmThicknessUm', 'particleDiameterUm']);
	});

	it('refuses an empty required field with a clear message', () => {
		const fields = fieldsOf({ ...lambdaFive, bumpCount: '' });
		expect(fields.bumpCount).toBe('Bump count is empty; enter a number');
	});
});
