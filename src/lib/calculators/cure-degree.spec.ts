import { describe, expect, it } from 'vitest';
import { integrateCure, type CureKinetics, type CureSegment } from './cure-degree';
import { runCalculator } from './registry';

// Molar gas constant, CODATA 2018 (exact); 0 °C = 273.15 K by definition
const R = 8.314462618;

/** Arrhenius k = A · exp(−Ea / RT) (CALCULATIONS.md), written out again here for the oracles. */
function k(aPerS: number, eaJPerMol: number, tempC: number): number {
	return aPerS * Math.exp(-eaJPerMol / (R * (tempC + 273.15)));
}

/** Temperature of a piecewise-linear profile at time t. */
function profileTempC(segments: readonly CureSegment[], tS: number): number {
	let startS = 0;
	for (const segment of segments) {
		if (tS <= startS + segment.durationS) {
			return segment.startC + ((segment.endC - segment.startC) * (tS - startS)) / segment.durationS;
		}
		startS += segment.durationS;
	}
	return segments[segments.length - 1].endC;
}

/** Composite Simpson rule for ∫ k(T(t)) dt from 0 to t, split at the kinks of the profile. */
function simpsonIntegralOfK(
	aPerS: number,
	eaJPerMol: number,
	segments: readonly CureSegment[],
	tS: number,
	intervalsPerSegment = 20000
): number {
	let total = 0;
	let startS = 0;
	for (const segment of segments) {
		const endS = Math.min(startS + segment.durationS, tS);
		if (endS > startS) {
			const h = (endS - startS) / intervalsPerSegment;
			const f = (t: number) =>
				k(
					aPerS,
					eaJPerMol,
					segment.startC + ((segment.endC - segment.startC) * (t - startS)) / segment.durationS
				);
			let sum = f(startS) + f(endS);
			for (let j = 1; j < intervalsPerSegment; j++)
				sum += (j % 2 === 1 ? 4 : 2) * f(startS + j * h);
			total += (sum * h) / 3;
		}
		startS += segment.durationS;
		if (startS >= tS) break;
	}
	return total;
}

/** Classical RK4 with a fine fixed step, as an independent reference for Kamal with m ≠ 1. */
function referenceKamalRk4(
	kinetics: Extract<CureKinetics, { model: 'kamal' }>,
	segments: readonly CureSegment[],
	steps: number
): number {
	const totalS = segments.reduce((sum, segment) => sum + segment.durationS, 0);
	const h = totalS / steps;
	const rate = (t: number, alpha: number) => {
		const a = Math.min(Math.max(alpha, 0), 1);
		const tempC = profileTempC(segments, t);
		const k1 = k(kinetics.a1, kinetics.ea1JPerMol, tempC);
		const k2 = k(kinetics.a2, kinetics.ea2JPerMol, tempC);
		return (k1 + k2 * a ** kinetics.m) * (1 - a) ** kinetics.n;
	};
	let alpha = 0;
	for (let j = 0; j < steps; j++) {
		const t = j * h;
		const s1 = rate(t, alpha);
		const s2 = rate(t + h / 2, alpha + (h / 2) * s1);
		const s3 = rate(t + h / 2, alpha + (h / 2) * s2);
		const s4 = rate(t + h, alpha + h * s3);
		alpha += (h / 6) * (s1 + 2 * s2 + 2 * s3 + s4);
	}
	return alpha;
}

// Illustrative kinetics in the published 60–100 kJ/mol range for epoxy ACF (CALCULATIONS.md)
const A_PER_S = 2.5e8;
const EA_J_PER_MOL = 80000;
const temperaturesC = [150, 170, 185, 200, 220];

const hold = (tempC: number, durationS: number): CureSegment[] => [
	{ startC: tempC, endC: tempC, durationS }
];

const bondProfile: CureSegment[] = [
	{ startC: 25, endC: 190, durationS: 4 },
	{ startC: 190, endC: 190, durationS: 10 },
	{ startC: 190, endC: 120, durationS: 6 }
];

describe('cure-degree: against the closed forms', () => {
	it('n = 1, isothermal: α = 1 − exp(−k t) to 1e-6', () => {
		for (const tempC of temperaturesC) {
			const rateK = k(A_PER_S, EA_J_PER_MOL, tempC);
			// Closed form of CALCULATIONS.md; time to 0.9 from it is ln(10) / k
			const result = integrateCure(
				{ model: 'nth-order', a: A_PER_S, eaJPerMol: EA_J_PER_MOL, n: 1 },
				hold(tempC, 30),
				{ targetDegree: 0.9 }
			);
			for (const point of result.curve) {
				expect(Math.abs(point.alpha - -Math.expm1(-rateK * point.tS))).toBeLessThan(1e-6);
			}
			const expectedTargetS = Math.log(10) / rateK;
			if (expectedTargetS < 30) {
				expect(Math.abs((result.timeToTargetS as number) - expectedTargetS)).toBeLessThan(1e-6);
			} else {
				expect(result.timeToTargetS).toBeNull();
			}
		}
	});

	it('n ≠ 1, isothermal: α = 1 − [1 + (n − 1) k t]^(−1/(n − 1)) to 1e-6', () => {
		for (const n of [0.5, 0.8, 1.5, 2, 3]) {
			for (const tempC of temperaturesC) {
				const rateK = k(A_PER_S, EA_J_PER_MOL, tempC);
				// For n < 1 the film is fully cured at k·t = 1 / (1 − n); stay short of it here
				const durationS = n < 1 ? Math.min(30, 0.9 / ((1 - n) * rateK)) : 30;
				const result = integrateCure(
					{ model: 'nth-order', a: A_PER_S, eaJPerMol: EA_J_PER_MOL, n },
					hold(tempC, durationS)
				);
				for (const point of result.curve) {
					// Closed form of CALCULATIONS.md
					const exact = 1 - (1 + (n - 1) * rateK * point.tS) ** (-1 / (n - 1));
					expect(Math.abs(point.alpha - exact), `n=${n} T=${tempC} t=${point.tS}`).toBeLessThan(
						1e-6
					);
				}
			}
		}
	});

	it('Kamal with m = 1, n = 1: α = k₁(E − 1) / (k₁E + k₂) to 1e-6', () => {
		const kinetics = {
			model: 'kamal',
			a1: 1e7,
			ea1JPerMol: 75000,
			a2: 1.2e7,
			ea2JPerMol: 65000,
			m: 1,
			n: 1
		} as const;
		for (const tempC of temperaturesC) {
			const k1 = k(kinetics.a1, kinetics.ea1JPerMol, tempC);
			const k2 = k(kinetics.a2, kinetics.ea2JPerMol, tempC);
			const result = integrateCure(kinetics, hold(tempC, 30));
			for (const point of result.curve) {
				// Closed form of CALCULATIONS.md, E = exp((k₁ + k₂) t)
				const e = Math.exp((k1 + k2) * point.tS);
				const exact = (k1 * (e - 1)) / (k1 * e + k2);
				expect(Math.abs(point.alpha - exact), `T=${tempC} t=${point.tS}`).toBeLessThan(1e-6);
			}
		}
	});

	it('n = 1 over a ramp: α = 1 − exp(−∫k dt), the integral by Simpson’s rule', () => {
		const kinetics = { model: 'nth-order', a: A_PER_S, eaJPerMol: EA_J_PER_MOL, n: 1 } as const;
		const result = integrateCure(kinetics, bondProfile, { targetDegree: 0.85 });
		for (const point of result.curve) {
			const theta = simpsonIntegralOfK(A_PER_S, EA_J_PER_MOL, bondProfile, point.tS);
			expect(Math.abs(point.alpha - -Math.expm1(-theta)), `t=${point.tS}`).toBeLessThan(1e-6);
		}
		const targetS = result.timeToTargetS as number;
		expect(targetS).toBeGreaterThan(0);
		// At the reported time, the independent integral gives the target degree
		const thetaAtTarget = simpsonIntegralOfK(A_PER_S, EA_J_PER_MOL, bondProfile, targetS);
		expect(Math.abs(-Math.expm1(-thetaAtTarget) - 0.85)).toBeLessThan(1e-6);
	});

	it('n = 1 over several ramps and temperatures', () => {
		for (const peakC of [160, 180, 200, 230]) {
			const profile: CureSegment[] = [
				{ startC: 30, endC: peakC, durationS: 2.5 },
				{ startC: peakC, endC: peakC, durationS: 8 },
				{ startC: peakC, endC: peakC - 40, durationS: 3 },
				{ startC: peakC - 40, endC: peakC + 10, durationS: 5 }
			];
			const result = integrateCure(
				{ model: 'nth-order', a: A_PER_S, eaJPerMol: EA_J_PER_MOL, n: 1 },
				profile
			);
			const theta = simpsonIntegralOfK(A_PER_S, EA_J_PER_MOL, profile, 18.5);
			expect(Math.abs(result.degreeOfCure - -Math.expm1(-theta)), `peak ${peakC}`).toBeLessThan(
				1e-6
			);
		}
	});
});

describe('cure-degree: cases without a closed form', () => {
	it('Kamal with m < 1 from an uncured film matches a fine fixed-step RK4', () => {
		for (const [m, n] of [
			[0.5, 1.5],
			[0.3, 1],
			[0.8, 2]
		]) {
			const kinetics = {
				model: 'kamal',
				a1: 1e7,
				ea1JPerMol: 75000,
				a2: 1.2e7,
				ea2JPerMol: 65000,
				m,
				n
			} as const;
			const result = integrateCure(kinetics, bondProfile);
			// Reference: classical RK4 with 400 000 fixed steps over the 20 s profile (common practice)
			const reference = referenceKamalRk4(kinetics, bondProfile, 400000);
			expect(Number.isFinite(result.degreeOfCure)).toBe(true);
			expect(Math.abs(result.degreeOfCure - reference), `m=${m} n=${n}`).toBeLessThan(1e-6);
		}
	});

	it('clamps a zero-order cure at α = 1', () => {
		// n = 0: α = min(1, k t), by integrating dα/dt = k directly (from memory)
		const rateK = k(A_PER_S, EA_J_PER_MOL, 200);
		const result = integrateCure(
			{ model: 'nth-order', a: A_PER_S, eaJPerMol: EA_J_PER_MOL, n: 0 },
			hold(200, 3 / rateK)
		);
		for (const point of result.curve) {
			expect(point.alpha).toBeLessThanOrEqual(1);
			expect(Math.abs(point.alpha - Math.min(1, rateK * point.tS))).toBeLessThan(1e-6);
		}
		expect(result.degreeOfCure).toBe(1);
	});

	it('stays at α = 0 when nothing starts the reaction', () => {
		// Kamal with k₁ = 0 from α = 0: dα/dt = 0 at α = 0, so α stays 0 (from the model itself)
		const run = runCalculator('cure-degree', {
			model: 'kamal',
			k1PreExponentialPerS: 0,
			k1ActivationEnergyKJPerMol: 75,
			k2PreExponentialPerS: 1e7,
			k2ActivationEnergyKJPerMol: 65,
			m: 0.5,
			n: 1.5,
			segments: bondProfile
		});
		expect(run.ok).toBe(true);
		if (!run.ok) return;
		expect(run.outputs.degreeOfCure).toBe(0);
		expect(run.outputs.timeToTargetS).toBeNull();
		expect(run.warnings.join(' ')).toMatch(/never starts/);
	});
});

describe('cure-degree: the calculator', () => {
	it('returns a curve of about 100 points that follows the profile', () => {
		const run = runCalculator('cure-degree', {
			model: 'nth-order',
			preExponentialPerS: '2.5e8',
			activationEnergyKJPerMol: '80',
			order: '1',
			segments: JSON.stringify(bondProfile)
		});
		expect(run.ok).toBe(true);
		if (!run.ok) return;
		const { curve } = run.outputs;
		expect(curve.length).toBeGreaterThanOrEqual(95);
		expect(curve.length).toBeLessThanOrEqual(110);
		expect(curve[0]).toEqual({ tS: 0, alpha: 0, tempC: 25 });
		expect(curve[curve.length - 1].tS).toBe(20);
		for (let j = 1; j < curve.length; j++) {
			expect(curve[j].tS).toBeGreaterThan(curve[j - 1].tS);
			expect(curve[j].alpha).toBeGreaterThanOrEqual(curve[j - 1].alpha);
			expect(curve[j].tempC).toBeCloseTo(profileTempC(bondProfile, curve[j].tS), 9);
		}
		// The segment ends are points of the curve, so the chart shows the corners of the profile
		expect(curve.some((point) => point.tS === 4 && point.tempC === 190)).toBe(true);
		expect(curve.some((point) => point.tS === 14 && point.tempC === 190)).toBe(true);
		expect(run.outputs.degreeOfCure).toBe(curve[curve.length - 1].alpha);
	});

	it('reports a target that is not reached', () => {
		const run = runCalculator('cure-degree', {
			model: 'nth-order',
			preExponentialPerS: 2.5e8,
			activationEnergyKJPerMol: 80,
			order: 1,
			segments: hold(120, 5),
			targetDegree: 0.9
		});
		expect(run.ok).toBe(true);
		if (!run.ok) return;
		expect(run.outputs.timeToTargetS).toBeNull();
		expect(run.warnings.join(' ')).toMatch(/does not reach the target/);
	});

	it('gives a field error for each bad input', () => {
		const noSegments = runCalculator('cure-degree', {
			model: 'nth-order',
			preExponentialPerS: 2.5e8,
			activationEnergyKJPerMol: 80,
			order: 1,
			segments: []
		});
		expect(noSegments.ok).toBe(false);
		if (!noSegments.ok) expect(noSegments.fields.segments).toMatch(/at least one segment/);

		const missing = runCalculator('cure-degree', { model: 'kamal', k1PreExponentialPerS: 1e7 });
		expect(missing.ok).toBe(false);
		if (!missing.ok) expect(missing.fields.segments).toMatch(/at least one segment/);

		const badSegment = runCalculator('cure-degree', {
			model: 'nth-order',
			preExponentialPerS: 2.5e8,
			activationEnergyKJPerMol: -5,
			order: 9,
			segments: [
				{ startC: 25, endC: 185, durationS: 3 },
				{ startC: 185, endC: '', durationS: 0 }
			],
			targetDegree: 1.5
		});
		expect(badSegment.ok).toBe(false);
		if (!badSegment.ok) {
			expect(badSegment.fields['segments.1.endC']).toMatch(/empty/);
			expect(badSegment.fields['segments.1.durationS']).toMatch(/greater than 0 s/);
			expect(badSegment.fields.activationEnergyKJPerMol).toMatch(/greater than 0/);
			expect(badSegment.fields.order).toMatch(/between 0 and 5/);
			expect(badSegment.fields.targetDegree).toMatch(/between 0 and 1/);
		}

		const kamal = runCalculator('cure-degree', {
			model: 'kamal',
			k1PreExponentialPerS: 1e7,
			segments: bondProfile
		});
		expect(kamal.ok).toBe(false);
		if (!kamal.ok) {
			expect(Object.keys(kamal.fields).sort()).toEqual([
				'k1ActivationEnergyKJPerMol',
				'k2ActivationEnergyKJPerMol',
				'k2PreExponentialPerS',
				'm',
				'n'
			]);
		}

		const model = runCalculator('cure-degree', { model: 'first-order', segments: bondProfile });
		expect(model.ok).toBe(false);
		if (!model.ok) expect(model.fields.model).toMatch(/one of: nth-order, kamal/);
	});
});
