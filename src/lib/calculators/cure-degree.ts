import { z } from 'zod';
import {
	CalculatorInputError,
	listSchema,
	optionalNumberSchema,
	selectSchema,
	type CalculatorResult,
	type ListInputDef,
	type NumberInputDef,
	type SelectInputDef
} from './fields';
import { GAS_CONSTANT_J_PER_MOL_K, ZERO_CELSIUS_K } from './units';

const onNthOrder = { input: 'model', equals: ['nth-order'] } as const;
const onKamal = { input: 'model', equals: ['kamal'] } as const;

const segmentFields = [
	{
		kind: 'number',
		name: 'startC',
		label: 'Start temperature',
		unit: '°C',
		min: -50,
		max: 400,
		step: 1,
		help: 'Bond-line temperature at the start of the segment.'
	},
	{
		kind: 'number',
		name: 'endC',
		label: 'End temperature',
		unit: '°C',
		min: -50,
		max: 400,
		step: 1,
		help: 'Bond-line temperature at the end of the segment; equal to the start for a hold.'
	},
	{
		kind: 'number',
		name: 'durationS',
		label: 'Duration',
		unit: 's',
		min: 0,
		minExclusive: true,
		max: 86400,
		step: 0.1,
		help: 'Length of the segment; the temperature changes linearly over it.'
	}
] as const satisfies readonly NumberInputDef[];

const rateConstant = (name: string, label: string, when: typeof onNthOrder | typeof onKamal) =>
	({
		kind: 'number',
		name,
		label,
		unit: '1/s',
		min: 0,
		max: 1e30,
		step: 1,
		optional: true,
		when,
		help: 'Arrhenius pre-exponential factor A in k = A · exp(−Ea / RT), from a DSC fit of the ACF.'
	}) satisfies NumberInputDef;

const activationEnergy = (name: string, label: string, when: typeof onNthOrder | typeof onKamal) =>
	({
		kind: 'number',
		name,
		label,
		unit: 'kJ/mol',
		min: 0,
		minExclusive: true,
		max: 500,
		step: 0.1,
		optional: true,
		when,
		help: 'Activation energy Ea; published values for epoxy conductive adhesives lie around 60–100 kJ/mol.'
	}) satisfies NumberInputDef;

const reactionOrder = (name: string, label: string, when: typeof onNthOrder | typeof onKamal) =>
	({
		kind: 'number',
		name,
		label,
		unit: '',
		min: 0,
		max: 5,
		step: 0.05,
		optional: true,
		when,
		help: 'Reaction order exponent from the kinetic fit.'
	}) satisfies NumberInputDef;

// Illustrative demo kinetics, not any real film: a 12 s hold at 185 °C after a 3 s ramp reaches
// about 0.9 with either model.
export const cureDegreeInputs = {
	model: {
		kind: 'select',
		name: 'model',
		label: 'Kinetic model',
		unit: '',
		options: [
			{ value: 'nth-order', label: 'n-th order' },
			{ value: 'kamal', label: 'Kamal–Sourour (autocatalytic)' }
		],
		default: 'nth-order',
		help: 'n-th order: dα/dt = k (1 − α)^n. Kamal–Sourour: dα/dt = (k₁ + k₂ α^m)(1 − α)^n.'
	},
	preExponentialPerS: {
		...rateConstant('preExponentialPerS', 'Pre-exponential factor', onNthOrder),
		min: 0,
		minExclusive: true,
		default: 2.5e8
	},
	activationEnergyKJPerMol: {
		...activationEnergy('activationEnergyKJPerMol', 'Activation energy', onNthOrder),
		default: 80
	},
	order: { ...reactionOrder('order', 'Reaction order n', onNthOrder), default: 1 },
	k1PreExponentialPerS: {
		...rateConstant('k1PreExponentialPerS', 'k₁ pre-exponential factor', onKamal),
		default: 1e7
	},
	k1ActivationEnergyKJPerMol: {
		...activationEnergy('k1ActivationEnergyKJPerMol', 'k₁ activation energy', onKamal),
		default: 75
	},
	k2PreExponentialPerS: {
		...rateConstant('k2PreExponentialPerS', 'k₂ pre-exponential factor', onKamal),
		default: 1.2e7
	},
	k2ActivationEnergyKJPerMol: {
		...activationEnergy('k2ActivationEnergyKJPerMol', 'k₂ activation energy', onKamal),
		default: 65
	},
	m: { ...reactionOrder('m', 'Autocatalytic exponent m', onKamal), default: 0.5 },
	n: { ...reactionOrder('n', 'Reaction order n', onKamal), default: 1.5 },
	segments: {
		kind: 'list',
		name: 'segments',
		label: 'Temperature profile',
		unit: '',
		itemLabel: 'segment',
		itemFields: segmentFields,
		minItems: 1,
		maxItems: 50,
		default: [
			{ startC: 25, endC: 185, durationS: 3 },
			{ startC: 185, endC: 185, durationS: 12 }
		],
		requiredMessage: 'Add at least one segment to the temperature profile',
		help: 'Bond-line temperature against time as linear segments; a hold has equal start and end.'
	},
	targetDegree: {
		kind: 'number',
		name: 'targetDegree',
		label: 'Target degree of cure',
		unit: '',
		default: 0.9,
		min: 0,
		minExclusive: true,
		max: 1,
		maxExclusive: true,
		step: 0.01,
		optional: true,
		help: 'The degree of cure α the recipe must reach; gives the time at which it is reached.'
	}
} satisfies Record<string, NumberInputDef | SelectInputDef | ListInputDef>;

const i = cureDegreeInputs;
const nthOrderKeys = ['preExponentialPerS', 'activationEnergyKJPerMol', 'order'] as const;
const kamalKeys = [
	'k1PreExponentialPerS',
	'k1ActivationEnergyKJPerMol',
	'k2PreExponentialPerS',
	'k2ActivationEnergyKJPerMol',
	'm',
	'n'
] as const;

export const cureDegreeSchema = z
	.object({
		model: selectSchema(i.model),
		preExponentialPerS: optionalNumberSchema(i.preExponentialPerS),
		activationEnergyKJPerMol: optionalNumberSchema(i.activationEnergyKJPerMol),
		order: optionalNumberSchema(i.order),
		k1PreExponentialPerS: optionalNumberSchema(i.k1PreExponentialPerS),
		k1ActivationEnergyKJPerMol: optionalNumberSchema(i.k1ActivationEnergyKJPerMol),
		k2PreExponentialPerS: optionalNumberSchema(i.k2PreExponentialPerS),
		k2ActivationEnergyKJPerMol: optionalNumberSchema(i.k2ActivationEnergyKJPerMol),
		m: optionalNumberSchema(i.m),
		n: optionalNumberSchema(i.n),
		segments: listSchema(i.segments),
		targetDegree: optionalNumberSchema(i.targetDegree)
	})
	.superRefine((input, ctx) => {
		const keys = input.model === 'kamal' ? kamalKeys : nthOrderKeys;
		const modelLabel = i.model.options.find((option) => option.value === input.model)?.label;
		for (const key of keys) {
			if (input[key] === undefined) {
				ctx.addIssue({
					code: 'custom',
					path: [key],
					message: `${i[key].label} is required for the ${modelLabel} model`
				});
			}
		}
	});

export type CureDegreeInput = z.output<typeof cureDegreeSchema>;
export type CureSegment = CureDegreeInput['segments'][number];

export interface CurePoint {
	tS: number;
	alpha: number;
	tempC: number;
}

export interface CureDegreeOutput {
	degreeOfCure: number;
	timeToTargetS: number | null;
	curve: CurePoint[];
}

/** Kinetics resolved to numbers; the rate constants are Arrhenius pairs (A in 1/s, Ea in J/mol). */
export type CureKinetics =
	| { model: 'nth-order'; a: number; eaJPerMol: number; n: number }
	| {
			model: 'kamal';
			a1: number;
			ea1JPerMol: number;
			a2: number;
			ea2JPerMol: number;
			m: number;
			n: number;
	  };

export interface IntegrateOptions {
	/** Local error allowed per step, in α. */
	tolerance?: number;
	/** Intervals of the uniform output grid (segment ends are added to it). */
	curveIntervals?: number;
	targetDegree?: number;
}

export interface CureIntegration {
	degreeOfCure: number;
	timeToTargetS: number | null;
	curve: CurePoint[];
	steps: number;
}

/** Arrhenius rate constant k = A · exp(−Ea / (R·T)), with T in °C. */
export function arrheniusPerS(aPerS: number, eaJPerMol: number, tempC: number): number {
	return aPerS * Math.exp(-eaJPerMol / (GAS_CONSTANT_J_PER_MOL_K * (tempC + ZERO_CELSIUS_K)));
}

type RateFunction = (tLocalS: number, alpha: number) => number;

// Clamped: α^m needs α ≥ 0 and (1 − α)^n needs α ≤ 1 (a step may overshoot by round-off).
function rateFor(kinetics: CureKinetics, segment: CureSegment): RateFunction {
	const slopeCPerS = (segment.endC - segment.startC) / segment.durationS;
	const hold = slopeCPerS === 0;
	if (kinetics.model === 'nth-order') {
		const { a, eaJPerMol, n } = kinetics;
		const kHold = arrheniusPerS(a, eaJPerMol, segment.startC);
		return (tLocalS, alpha) => {
			if (alpha >= 1) return 0;
			const k = hold ? kHold : arrheniusPerS(a, eaJPerMol, segment.startC + slopeCPerS * tLocalS);
			const free = alpha <= 0 ? 1 : 1 - alpha;
			return n === 1 ? k * free : k * Math.pow(free, n);
		};
	}
	const { a1, ea1JPerMol, a2, ea2JPerMol, m, n } = kinetics;
	const k1Hold = arrheniusPerS(a1, ea1JPerMol, segment.startC);
	const k2Hold = arrheniusPerS(a2, ea2JPerMol, segment.startC);
	return (tLocalS, alpha) => {
		if (alpha >= 1) return 0;
		const tempC = segment.startC + slopeCPerS * tLocalS;
		const k1 = hold ? k1Hold : arrheniusPerS(a1, ea1JPerMol, tempC);
		const k2 = hold ? k2Hold : arrheniusPerS(a2, ea2JPerMol, tempC);
		const cured = alpha <= 0 ? 0 : alpha;
		return (k1 + k2 * Math.pow(cured, m)) * Math.pow(1 - cured, n);
	};
}

// Dormand–Prince 5(4) tableau (Dormand & Prince 1980), with the difference of the two weight rows.
const A21 = 1 / 5;
const A31 = 3 / 40;
const A32 = 9 / 40;
const A41 = 44 / 45;
const A42 = -56 / 15;
const A43 = 32 / 9;
const A51 = 19372 / 6561;
const A52 = -25360 / 2187;
const A53 = 64448 / 6561;
const A54 = -212 / 729;
const A61 = 9017 / 3168;
const A62 = -355 / 33;
const A63 = 46732 / 5247;
const A64 = 49 / 176;
const A65 = -5103 / 18656;
const B1 = 35 / 384;
const B3 = 500 / 1113;
const B4 = 125 / 192;
const B5 = -2187 / 6784;
const B6 = 11 / 84;
const E1 = 71 / 57600;
const E3 = -71 / 16695;
const E4 = 71 / 1920;
const E5 = -17253 / 339200;
const E6 = 22 / 525;
const E7 = -1 / 40;

interface StepResult {
	alpha: number;
	error: number;
	/** Rate at the end of the step, reused as the first stage of the next (FSAL). */
	rateEnd: number;
}

function dormandPrinceStep(
	rate: RateFunction,
	t: number,
	y: number,
	h: number,
	k1: number,
	out: StepResult
): void {
	const k2 = rate(t + h / 5, y + h * A21 * k1);
	const k3 = rate(t + (3 * h) / 10, y + h * (A31 * k1 + A32 * k2));
	const k4 = rate(t + (4 * h) / 5, y + h * (A41 * k1 + A42 * k2 + A43 * k3));
	const k5 = rate(t + (8 * h) / 9, y + h * (A51 * k1 + A52 * k2 + A53 * k3 + A54 * k4));
	const k6 = rate(t + h, y + h * (A61 * k1 + A62 * k2 + A63 * k3 + A64 * k4 + A65 * k5));
	const next = y + h * (B1 * k1 + B3 * k3 + B4 * k4 + B5 * k5 + B6 * k6);
	const k7 = rate(t + h, next);
	out.alpha = next;
	out.error = Math.abs(h * (E1 * k1 + E3 * k3 + E4 * k4 + E5 * k5 + E6 * k6 + E7 * k7));
	out.rateEnd = k7;
}

// Closer than this to full cure, the rest of the profile can change α by less than the tolerance.
const FULL_CURE_GAP = 1e-12;
const MAX_STEPS = 2_000_000;
const DEFAULT_TOLERANCE = 1e-10;

function outputTimes(segments: readonly CureSegment[], intervals: number): number[] {
	const totalS = segments.reduce((sum, segment) => sum + segment.durationS, 0);
	const boundaries: number[] = [];
	let boundaryS = 0;
	for (const segment of segments) {
		boundaryS += segment.durationS;
		boundaries.push(boundaryS);
	}
	// Grid times that coincide with a segment end within round-off are left out, so the segment
	// ends (where the integration must stop exactly) stay and the curve has no zero-length steps.
	const slackS = totalS * 1e-9;
	const grid: number[] = [];
	for (let j = 1; j < intervals; j++) {
		const time = (totalS * j) / intervals;
		if (boundaries.every((boundary) => Math.abs(boundary - time) > slackS)) grid.push(time);
	}
	return [0, ...grid, ...boundaries].sort((x, y) => x - y);
}

function tooStiff(): never {
	throw new CalculatorInputError(
		'The cure profile could not be integrated to the required accuracy; check the kinetic parameters.',
		{ segments: 'The kinetics are too fast to integrate over this profile' }
	);
}

/**
 * Integrates dα/dt over a piecewise-linear temperature profile from α = 0 with adaptive
 * Dormand–Prince 5(4) steps. Each step is cut at segment ends and curve times, so neither the
 * kinks of the profile nor the curve points rely on interpolation.
 */
export function integrateCure(
	kinetics: CureKinetics,
	segments: readonly CureSegment[],
	options: IntegrateOptions = {}
): CureIntegration {
	const tolerance = options.tolerance ?? DEFAULT_TOLERANCE;
	const target = options.targetDegree;
	const times = outputTimes(segments, options.curveIntervals ?? 100);
	const curve: CurePoint[] = [{ tS: 0, alpha: 0, tempC: segments[0].startC }];
	const step: StepResult = { alpha: 0, error: 0, rateEnd: 0 };
	const probe: StepResult = { alpha: 0, error: 0, rateEnd: 0 };
	let alpha = 0;
	let timeToTargetS: number | null = null;
	let steps = 0;
	let h = 0;
	let timeIndex = 1;
	let segmentStartS = 0;

	for (const segment of segments) {
		const rate = rateFor(kinetics, segment);
		const segmentEndS = segmentStartS + segment.durationS;
		const slopeCPerS = (segment.endC - segment.startC) / segment.durationS;
		let tLocal = 0;
		let k1 = rate(0, alpha);
		if (h === 0) h = Math.min(segment.durationS, k1 > 0 ? 1e-3 / k1 : segment.durationS);

		while (timeIndex < times.length && times[timeIndex] <= segmentEndS) {
			const atEnd = times[timeIndex] === segmentEndS;
			const stopLocal = atEnd ? segment.durationS : times[timeIndex] - segmentStartS;
			while (tLocal < stopLocal) {
				if (alpha >= 1) {
					tLocal = stopLocal;
					break;
				}
				const remaining = stopLocal - tLocal;
				const truncated = h >= remaining;
				const hStep = truncated ? remaining : h;
				dormandPrinceStep(rate, tLocal, alpha, hStep, k1, step);
				if (++steps > MAX_STEPS) tooStiff();
				const factor =
					step.error === 0 ? 5 : Math.min(5, Math.max(0.2, 0.9 * (tolerance / step.error) ** 0.2));
				if (step.error > tolerance) {
					h = hStep * factor;
					// A step too small to move the clock can never finish the profile.
					if (tLocal + h === tLocal) tooStiff();
					continue;
				}
				const next = Math.min(step.alpha, 1);
				if (target !== undefined && timeToTargetS === null && alpha < target && next >= target) {
					timeToTargetS =
						segmentStartS + tLocal + crossing(rate, tLocal, alpha, hStep, k1, target, probe);
				}
				alpha = next;
				tLocal = truncated ? stopLocal : tLocal + hStep;
				k1 = step.rateEnd;
				h = truncated && factor >= 1 ? Math.max(h, hStep * factor) : hStep * factor;
				if (1 - alpha <= FULL_CURE_GAP) alpha = 1;
			}
			curve.push({
				tS: times[timeIndex],
				alpha,
				tempC: atEnd ? segment.endC : segment.startC + slopeCPerS * stopLocal
			});
			timeIndex++;
		}
		segmentStartS = segmentEndS;
	}
	return { degreeOfCure: alpha, timeToTargetS, curve, steps };
}

/** Time within an accepted step at which α reaches the target, by bisection on the step length. */
function crossing(
	rate: RateFunction,
	t: number,
	alpha: number,
	h: number,
	k1: number,
	target: number,
	probe: StepResult
): number {
	let low = 0;
	let high = h;
	for (let iteration = 0; iteration < 60 && high - low > h * 1e-13; iteration++) {
		const mid = (low + high) / 2;
		dormandPrinceStep(rate, t, alpha, mid, k1, probe);
		if (probe.alpha < target) low = mid;
		else high = mid;
	}
	return (low + high) / 2;
}

/** The kinetics of a validated input, with activation energies in J/mol. */
export function kineticsOf(input: CureDegreeInput): CureKinetics {
	if (input.model === 'kamal') {
		return {
			model: 'kamal',
			a1: input.k1PreExponentialPerS as number,
			ea1JPerMol: (input.k1ActivationEnergyKJPerMol as number) * 1000,
			a2: input.k2PreExponentialPerS as number,
			ea2JPerMol: (input.k2ActivationEnergyKJPerMol as number) * 1000,
			m: input.m as number,
			n: input.n as number
		};
	}
	return {
		model: 'nth-order',
		a: input.preExponentialPerS as number,
		eaJPerMol: (input.activationEnergyKJPerMol as number) * 1000,
		n: input.order as number
	};
}

export function computeCureDegree(input: CureDegreeInput): CalculatorResult<CureDegreeOutput> {
	const warnings: string[] = [];
	const targetDegree = input.targetDegree ?? 0.9;
	const result = integrateCure(kineticsOf(input), input.segments, { targetDegree });
	if (input.model === 'kamal' && input.k1PreExponentialPerS === 0) {
		warnings.push(
			'With k₁ = 0 the Kamal–Sourour model never starts from an uncured film (α = 0 stays 0).'
		);
	}
	if (result.timeToTargetS === null) {
		warnings.push(
			`The profile does not reach the target degree of cure ${targetDegree}; it ends at ${result.degreeOfCure.toFixed(3)}.`
		);
	}
	return {
		outputs: {
			degreeOfCure: result.degreeOfCure,
			timeToTargetS: result.timeToTargetS,
			curve: result.curve
		},
		warnings
	};
}
