import { z } from 'zod';
import {
	numberSchema,
	oneMinusExp,
	optionalNumberSchema,
	type CalculatorResult,
	type NumberInputDef
} from './fields';

export const particleCaptureInputs = {
	densityPerMm2: {
		kind: 'number',
		name: 'densityPerMm2',
		label: 'Particle density',
		unit: 'pcs/mm²',
		default: 30000,
		min: 0,
		minExclusive: true,
		max: 1000000,
		step: 100,
		optional: true,
		help: "Particles per mm² of film, from the ACF maker's data sheet. Or leave empty and give the volume fraction, film thickness and particle diameter."
	},
	volumeFractionPct: {
		kind: 'number',
		name: 'volumeFractionPct',
		label: 'Particle volume fraction',
		unit: '%',
		min: 0,
		minExclusive: true,
		max: 60,
		step: 0.1,
		optional: true,
		help: 'Conductive particles as a share of the film volume; used only when no density is given.'
	},
	filmThicknessUm: {
		kind: 'number',
		name: 'filmThicknessUm',
		label: 'Film thickness',
		unit: 'µm',
		min: 0,
		minExclusive: true,
		max: 200,
		step: 0.1,
		optional: true,
		help: 'ACF thickness before bonding; used with the volume fraction.'
	},
	particleDiameterUm: {
		kind: 'number',
		name: 'particleDiameterUm',
		label: 'Particle diameter',
		unit: 'µm',
		min: 0,
		minExclusive: true,
		max: 50,
		step: 0.1,
		optional: true,
		help: 'Conductive particle diameter; used with the volume fraction.'
	},
	bumpWidthUm: {
		kind: 'number',
		name: 'bumpWidthUm',
		label: 'Bump width',
		unit: 'µm',
		default: 20,
		min: 0,
		minExclusive: true,
		max: 5000,
		step: 0.1,
		help: 'Bump width from the chip drawing.'
	},
	bumpLengthUm: {
		kind: 'number',
		name: 'bumpLengthUm',
		label: 'Bump length',
		unit: 'µm',
		default: 100,
		min: 0,
		minExclusive: true,
		max: 10000,
		step: 0.1,
		help: 'Bump length from the chip drawing.'
	},
	captureRatio: {
		kind: 'number',
		name: 'captureRatio',
		label: 'Capture ratio',
		unit: '',
		default: 0.3,
		min: 0,
		minExclusive: true,
		max: 1,
		step: 0.01,
		help: 'Share of the particles over a bump that stay trapped after resin flow: about 0.3 for thermal bonding; 0.2–0.5 is a fair planning range.'
	},
	minParticles: {
		kind: 'number',
		name: 'minParticles',
		label: 'Minimum particles per bump',
		unit: 'pcs',
		default: 3,
		min: 1,
		max: 100,
		integer: true,
		step: 1,
		help: 'A bump with fewer trapped particles counts as at risk of an open; 3–5 is common practice for COG.'
	},
	bumpCount: {
		kind: 'number',
		name: 'bumpCount',
		label: 'Bump count',
		unit: 'pcs',
		default: 1200,
		min: 1,
		max: 10000000,
		integer: true,
		step: 1,
		help: 'Bumps per part; every one of them must hold enough particles.'
	},
	targetProbability: {
		kind: 'number',
		name: 'targetProbability',
		label: 'Target probability',
		unit: '',
		default: 0.001,
		min: 0,
		minExclusive: true,
		max: 1,
		maxExclusive: true,
		step: 0.0001,
		optional: true,
		help: 'The largest acceptable chance that any bump of a part is below the minimum; gives the density needed.'
	}
} satisfies Record<string, NumberInputDef>;

const i = particleCaptureInputs;
const volumeKeys = ['volumeFractionPct', 'filmThicknessUm', 'particleDiameterUm'] as const;

export const particleCaptureSchema = z
	.object({
		densityPerMm2: optionalNumberSchema(i.densityPerMm2),
		volumeFractionPct: optionalNumberSchema(i.volumeFractionPct),
		filmThicknessUm: optionalNumberSchema(i.filmThicknessUm),
		particleDiameterUm: optionalNumberSchema(i.particleDiameterUm),
		bumpWidthUm: numberSchema(i.bumpWidthUm),
		bumpLengthUm: numberSchema(i.bumpLengthUm),
		captureRatio: numberSchema(i.captureRatio),
		minParticles: numberSchema(i.minParticles),
		bumpCount: numberSchema(i.bumpCount),
		targetProbability: optionalNumberSchema(i.targetProbability)
	})
	.superRefine((input, ctx) => {
		const given = volumeKeys.filter((key) => input[key] !== undefined);
		if (input.densityPerMm2 !== undefined) {
			if (given.length > 0) {
				ctx.addIssue({
					code: 'custom',
					path: ['densityPerMm2'],
					message:
						'Give either the particle density or the volume fraction, film thickness and particle diameter, not both'
				});
			}
			return;
		}
		if (given.length === 0) {
			ctx.addIssue({
				code: 'custom',
				path: ['densityPerMm2'],
				message:
					'Enter the particle density, or the volume fraction, film thickness and particle diameter'
			});
			return;
		}
		for (const key of volumeKeys) {
			if (input[key] === undefined) {
				ctx.addIssue({
					code: 'custom',
					path: [key],
					message: `${i[key].label} is required to derive the density from the volume fraction`
				});
			}
		}
	});

export type ParticleCaptureInput = z.output<typeof particleCaptureSchema>;

export interface ParticleCaptureOutput {
	/** The density used: as given, or derived from the volume fraction. */
	densityPerMm2: number;
	meanPerBump: number;
	probBumpBelowMin: number;
	probAnyBumpBelowMin: number;
	/** Present when a target is given; null when no density within reach meets it. */
	requiredDensityPerMm2?: number | null;
}

function logFactorial(k: number): number {
	let sum = 0;
	for (let j = 2; j <= k; j++) sum += Math.log(j);
	return sum;
}

/** Poisson probabilities P(N = k) for k = 0..kMax, for the particles-per-bump chart. */
export function poissonPmf(lambda: number, kMax: number): number[] {
	const pmf: number[] = [];
	if (lambda === 0) {
		for (let k = 0; k <= kMax; k++) pmf.push(k === 0 ? 1 : 0);
		return pmf;
	}
	const logLambda = Math.log(lambda);
	let logFact = 0;
	for (let k = 0; k <= kMax; k++) {
		if (k > 1) logFact += Math.log(k);
		// Log space: e^(−λ) alone underflows for λ above about 745.
		pmf.push(Math.exp(-lambda + k * logLambda - logFact));
	}
	return pmf;
}

/**
 * P(N < kMin) and P(N ≥ kMin) for N ~ Poisson(λ), each summed directly where it is the smaller
 * one, so that both stay accurate to full relative precision even when tiny.
 */
export function poissonSplit(lambda: number, kMin: number): { below: number; atLeast: number } {
	if (kMin <= 0) return { below: 0, atLeast: 1 };
	if (lambda === 0) return { below: 1, atLeast: 0 };
	const terms = poissonPmf(lambda, kMin - 1);
	let below = 0;
	// Adding the smallest terms first loses the least.
	for (let k = terms.length - 1; k >= 0; k--) below += terms[k];
	if (below <= 0.5) return { below, atLeast: 1 - below };
	const logLambda = Math.log(lambda);
	let term = Math.exp(-lambda + kMin * logLambda - logFactorial(kMin));
	let atLeast = 0;
	for (let k = kMin; k < kMin + 100000; k++) {
		atLeast += term;
		if (k > lambda && term <= atLeast * 1e-17) break;
		term *= lambda / (k + 1);
	}
	return { below: 1 - atLeast, atLeast };
}

/** P(at least one of `count` independent bumps holds fewer than kMin particles). */
export function probabilityAnyBelow(lambda: number, kMin: number, count: number): number {
	const { below, atLeast } = poissonSplit(lambda, kMin);
	// log(1 − P) from whichever side is exact: log1p(−P) for small P, log(P(N ≥ kMin)) otherwise.
	const logNoneBelow = below <= 0.5 ? Math.log1p(-below) : Math.log(atLeast);
	return oneMinusExp(count * logNoneBelow);
}

// Far beyond any film; past this the target is treated as unreachable.
const MAX_SEARCH_LAMBDA = 1e9;

/** The smallest mean per bump λ with probabilityAnyBelow(λ) ≤ target, or null if out of reach. */
export function requiredMeanPerBump(kMin: number, count: number, target: number): number | null {
	let low = 0;
	let high = Math.max(1, kMin);
	while (probabilityAnyBelow(high, kMin, count) > target) {
		low = high;
		high *= 2;
		if (high > MAX_SEARCH_LAMBDA) return null;
	}
	// The probability falls monotonically with λ, so bisection on the exact function converges.
	for (let step = 0; step < 200 && high - low > high * 1e-14; step++) {
		const mid = (low + high) / 2;
		if (probabilityAnyBelow(mid, kMin, count) > target) low = mid;
		else high = mid;
	}
	return high;
}

/** Particle density from volume fraction, film thickness and particle diameter, in pcs/mm². */
export function densityFromVolumeFraction(
	volumeFractionPct: number,
	filmThicknessUm: number,
	particleDiameterUm: number
): number {
	const particleVolumeUm3 = (Math.PI * particleDiameterUm ** 3) / 6;
	const perUm2 = ((volumeFractionPct / 100) * filmThicknessUm) / particleVolumeUm3;
	return perUm2 * 1e6;
}

export function computeParticleCapture(
	input: ParticleCaptureInput
): CalculatorResult<ParticleCaptureOutput> {
	const warnings: string[] = [];
	const densityPerMm2 =
		input.densityPerMm2 ??
		densityFromVolumeFraction(
			input.volumeFractionPct as number,
			input.filmThicknessUm as number,
			input.particleDiameterUm as number
		);
	const bumpAreaMm2 = input.bumpWidthUm * input.bumpLengthUm * 1e-6;
	const capturePerDensity = bumpAreaMm2 * input.captureRatio;
	const meanPerBump = densityPerMm2 * capturePerDensity;
	const probBumpBelowMin = poissonSplit(meanPerBump, input.minParticles).below;
	const probAnyBumpBelowMin = probabilityAnyBelow(meanPerBump, input.minParticles, input.bumpCount);
	const outputs: ParticleCaptureOutput = {
		densityPerMm2,
		meanPerBump,
		probBumpBelowMin,
		probAnyBumpBelowMin
	};
	if (input.targetProbability !== undefined) {
		const lambda = requiredMeanPerBump(
			input.minParticles,
			input.bumpCount,
			input.targetProbability
		);
		outputs.requiredDensityPerMm2 = lambda === null ? null : lambda / capturePerDensity;
		if (lambda === null) {
			warnings.push('No particle density within reach meets the target probability.');
		} else if (lambda / capturePerDensity > i.densityPerMm2.max) {
			warnings.push(
				`The required density is above the ${i.densityPerMm2.max} pcs/mm² this calculator accepts; a larger bump or a better capture ratio is needed.`
			);
		}
	}
	if (input.captureRatio < 0.2 || input.captureRatio > 0.5) {
		warnings.push(
			'The capture ratio is outside the 0.2–0.5 planning range; check it against trials.'
		);
	}
	if (meanPerBump < input.minParticles) {
		warnings.push('The mean particle count per bump is below the minimum: opens are likely.');
	}
	return { outputs, warnings };
}
