import { describe, expect, it } from 'vitest';
import { fitLine, type HeadOffsetOutput } from './head-offset';
import { runCalculator } from './registry';

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

function run(input: Record<string, unknown>): { outputs: HeadOffsetOutput; warnings: string[] } {
	const result = runCalculator('head-offset', input);
	if (!result.ok) throw new Error(`${result.error} ${JSON.stringify(result.fields)}`);
	return result;
}

function fieldsOf(input: Record<string, unknown>): Record<string, string> {
	const result = runCalculator('head-offset', input);
	expect(result.ok).toBe(false);
	return result.ok ? {} : result.fields;
}

// Invented calibration points (the calculator's illustrative defaults)
const points = [
	{ setpointC: 200, measuredC: 167.5 },
	{ setpointC: 220, measuredC: 183.8 },
	{ setpointC: 240, measuredC: 200.6 },
	{ setpointC: 260, measuredC: 216.9 }
];

describe('head-offset: least squares', () => {
	it('matches a least-squares fit worked by hand', () => {
		// By hand (textbook least squares): mean x = 230, mean y = 192.2, Sxx = 2000, Sxy = 1650,
		// so b = 0.825 and a = 192.2 − 0.825 × 230 = 2.45; residuals 0.05, −0.15, 0.15, −0.05 give
		// SSres = 0.05 and Syy = 1361.3, so R² = 1 − 0.05 / 1361.3; the set-point for 185 °C is
		// (185 − 2.45) / 0.825 = 221.2727…
		const { outputs, warnings } = run({ points, targetC: 185 });
		expect(outputs.slope).toBeCloseTo(0.825, 12);
		expect(outputs.interceptC).toBeCloseTo(2.45, 10);
		expect(outputs.rSquared).toBeCloseTo(1 - 0.05 / 1361.3, 12);
		expect(outputs.requiredSetpointC).toBeCloseTo(182.55 / 0.825, 9);
		expect(outputs.timeToReachS).toBeUndefined();
		expect(warnings).toEqual([]);
	});

	it('recovers an exact line with R² = 1', () => {
		// Points on T_acf = 5 + 0.8 · T_set (constructed), so b = 0.8, a = 5 exactly
		const line = [150, 190, 230].map((setpointC) => ({
			setpointC,
			measuredC: 5 + 0.8 * setpointC
		}));
		const { outputs } = run({ points: line, targetC: 165 });
		expect(outputs.slope).toBeCloseTo(0.8, 12);
		expect(outputs.interceptC).toBeCloseTo(5, 10);
		expect(outputs.rSquared).toBeCloseTo(1, 12);
		// (165 − 5) / 0.8 = 200, by hand
		expect(outputs.requiredSetpointC).toBeCloseTo(200, 9);
	});

	it('satisfies the normal equations for random calibrations', () => {
		const random = mulberry32(7);
		for (let trial = 0; trial < 200; trial++) {
			const count = 2 + Math.floor(random() * 10);
			const xs = Array.from({ length: count }, (_, j) => 150 + j * 10 + random() * 5);
			const ys = xs.map((x) => 10 + 0.8 * x + (random() - 0.5) * 6);
			const fit = fitLine(xs, ys);
			// Least squares: residuals sum to zero and are orthogonal to x (textbook normal equations)
			const residuals = xs.map((x, j) => ys[j] - (fit.intercept + fit.slope * x));
			const sum = residuals.reduce((total, r) => total + r, 0);
			const dot = residuals.reduce((total, r, j) => total + r * xs[j], 0);
			expect(Math.abs(sum)).toBeLessThan(1e-9);
			expect(Math.abs(dot)).toBeLessThan(1e-6);
			expect(fit.rSquared).toBeGreaterThanOrEqual(0);
			expect(fit.rSquared).toBeLessThanOrEqual(1);
		}
	});
});

describe('head-offset: first-order lag', () => {
	it('gives the time to reach a temperature', () => {
		// −τ ln(1 − (180 − 25) / (185 − 25)) = −2 ln(1/32) = 10 ln 2 s (CALCULATIONS.md, by hand)
		const { outputs } = run({
			points,
			targetC: 185,
			tauS: 2,
			startC: 25,
			steadyC: 185,
			reachC: 180
		});
		expect(outputs.timeToReachS).toBeCloseTo(10 * Math.LN2, 12);
		// Reaching the start temperature takes no time
		const atStart = run({ points, targetC: 185, tauS: 2, startC: 25, steadyC: 185, reachC: 25 });
		expect(atStart.outputs.timeToReachS).toBe(0);
	});

	it('refuses lag inputs given in part, or a reach temperature outside the climb', () => {
		const partial = fieldsOf({ points, targetC: 185, tauS: 2, reachC: 180 });
		expect(Object.keys(partial).sort()).toEqual(['startC', 'steadyC']);
		expect(partial.startC).toMatch(/lag inputs/);
		const lag = { points, targetC: 185, tauS: 2, startC: 25, steadyC: 185 };
		expect(fieldsOf({ ...lag, reachC: 190 }).reachC).toMatch(/between the start and steady/);
		expect(fieldsOf({ ...lag, reachC: 185 }).reachC).toMatch(/between the start and steady/);
		expect(fieldsOf({ ...lag, reachC: 20 }).reachC).toMatch(/between the start and steady/);
		expect(fieldsOf({ ...lag, steadyC: 25, reachC: 25 }).steadyC).toMatch(/differ/);
		expect(fieldsOf({ ...lag, tauS: 0, reachC: 180 }).tauS).toMatch(/greater than 0 s/);
	});
});

describe('head-offset: validation and warnings', () => {
	it('needs at least two distinct set-points', () => {
		const same = fieldsOf({
			points: [
				{ setpointC: 220, measuredC: 180 },
				{ setpointC: 220, measuredC: 184 }
			],
			targetC: 185
		});
		expect(same.points).toMatch(/two different set-points/);
		expect(fieldsOf({ points: [points[0]], targetC: 185 }).points).toMatch(/at least 2/);
		expect(fieldsOf({ targetC: 185 }).points).toMatch(/at least two calibration points/);
	});

	it('refuses a calibration whose measured temperature never changes', () => {
		const flat = fieldsOf({
			points: [
				{ setpointC: 200, measuredC: 180 },
				{ setpointC: 240, measuredC: 180 }
			],
			targetC: 185
		});
		expect(flat.points).toMatch(/does not change/);
	});

	it('gives field errors inside the list and accepts the list as JSON text', () => {
		const fields = fieldsOf({
			points: [
				{ setpointC: 200, measuredC: '' },
				{ setpointC: 'x', measuredC: 190 }
			],
			targetC: ''
		});
		expect(fields['points.0.measuredC']).toMatch(/empty/);
		expect(fields['points.1.setpointC']).toMatch(/must be a number/);
		expect(fields.targetC).toMatch(/empty/);
		const fromText = run({ points: JSON.stringify(points), targetC: '185' }).outputs;
		expect(fromText).toEqual(run({ points, targetC: 185 }).outputs);
	});

	it('warns about extrapolation and a poor fit', () => {
		// 260 °C target needs a set-point far above the calibrated 200–260 °C
		expect(run({ points, targetC: 260 }).warnings.join(' ')).toMatch(/outside the calibrated/);
		const scattered = [
			{ setpointC: 200, measuredC: 170 },
			{ setpointC: 220, measuredC: 195 },
			{ setpointC: 240, measuredC: 190 },
			{ setpointC: 260, measuredC: 218 }
		];
		expect(run({ points: scattered, targetC: 190 }).warnings.join(' ')).toMatch(/scatter/);
	});
});
