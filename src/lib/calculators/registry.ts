import type { z } from 'zod';
import {
	bondForceInputs,
	bondForceSchema,
	computeBondForce,
	type BondForceOutput
} from './bond-force';
import {
	bridgeRiskInputs,
	bridgeRiskSchema,
	computeBridgeRisk,
	type BridgeRiskOutput
} from './bridge-risk';
import {
	computeCureDegree,
	cureDegreeInputs,
	cureDegreeSchema,
	type CureDegreeOutput
} from './cure-degree';
import {
	CalculatorInputError,
	findNonFinite,
	issuesToFields,
	type CalculatorResult,
	type InputDef
} from './fields';
import {
	computeHeadOffset,
	headOffsetInputs,
	headOffsetSchema,
	type HeadOffsetOutput
} from './head-offset';
import {
	computeParticleCapture,
	particleCaptureInputs,
	particleCaptureSchema,
	type ParticleCaptureOutput
} from './particle-capture';
import {
	computePitchCompensation,
	pitchCompensationInputs,
	pitchCompensationSchema,
	type PitchCompensationOutput
} from './pitch-compensation';
import { computeUnits, unitsInputs, unitsSchema, type UnitsOutput } from './units';
import { calculatorIds, isCalculatorId, type CalculatorId } from './ids';

export type {
	InputDef,
	ListInputDef,
	NumberInputDef,
	SelectInputDef,
	SelectOption
} from './fields';

export { calculatorIds, isCalculatorId, type CalculatorId };

/** Shown on every calculator page and embedded calculator block. */
export const CALCULATOR_CAUTION =
	"Results are planning figures. The ACF maker's data sheet, the bonder's manual and the plant's validated recipe govern; never use a calculated value in place of a validated recipe.";

export interface OutputDef {
	name: string;
	label: string;
	unit: string;
	/** Significant digits to show. */
	digits: number;
	/** `series` outputs are lists of points for a chart; `number` outputs may be null or absent. */
	kind: 'number' | 'series';
	help?: string;
}

export interface SourceDef {
	citation: string;
	/** What the source backs: a formula, a check value, a range. */
	note: string;
}

export interface CalculatorOutputs {
	'bond-force': BondForceOutput;
	'particle-capture': ParticleCaptureOutput;
	'bridge-risk': BridgeRiskOutput;
	'cure-degree': CureDegreeOutput;
	'pitch-compensation': PitchCompensationOutput;
	'head-offset': HeadOffsetOutput;
	units: UnitsOutput;
}

export interface CalculatorDef<I extends CalculatorId = CalculatorId> {
	id: I;
	title: string;
	description: string;
	inputs: readonly InputDef[];
	outputs: readonly OutputDef[];
	method: string;
	sources: readonly SourceDef[];
	/** Cautions for the work the figures are used for (hot heads, pinch points); may be empty. */
	safety: readonly string[];
}

interface Engine<I extends CalculatorId> {
	schema: z.ZodType;
	compute: (input: never) => CalculatorResult<CalculatorOutputs[I]>;
}

const NIST_SP_811: SourceDef = {
	citation:
		'Guide for the Use of the International System of Units (SI), NIST Special Publication 811, 2008 edition, Appendix B.8 and B.9',
	note: 'Exact conversion factors for kgf, gf, lbf, psi, bar and inch.'
};

// The usual shop-floor cautions, repeated where a calculator's figures lead to work at the bonder.
const HOT_HEAD =
	'The bond head and stage run at 150–300 °C: do not touch them, and let them cool (or use heat-resistant gloves as the plant rules say) before changing buffer sheets, tools or thermocouples.';
const PINCH_POINT =
	'Pinch point under the pneumatic head: keep hands clear while it moves, and never defeat the guards or the two-hand control.';
const PTFE_FUMES =
	'An overheated PTFE buffer sheet gives off harmful fumes: keep to its rated temperature and keep the local exhaust running.';

const numberOutput = (name: string, label: string, unit: string, digits: number, help?: string) =>
	({ name, label, unit, digits, kind: 'number', help }) satisfies OutputDef;

export const calculators: { [I in CalculatorId]: CalculatorDef<I> } = {
	'bond-force': {
		id: 'bond-force',
		title: 'Bond force',
		description:
			'Force from pressure (or pressure from force) on a stated area basis, with the gauge pressure for a pneumatic head.',
		inputs: Object.values(bondForceInputs),
		outputs: [
			numberOutput('areaMm2', 'Area on the basis', 'mm²', 4),
			numberOutput('pressureMPa', 'Pressure', 'MPa', 4),
			numberOutput('forceN', 'Force', 'N', 4),
			numberOutput('forceKgf', 'Force', 'kgf', 4),
			numberOutput('forcePerBumpMN', 'Force per bump', 'mN', 4, 'Bump basis only.'),
			numberOutput(
				'cylinderGaugeMPa',
				'Cylinder gauge pressure',
				'MPa',
				3,
				'When a bore is given.'
			),
			numberOutput('cylinderGaugeBar', 'Cylinder gauge pressure', 'bar', 3, 'When a bore is given.')
		],
		method:
			'Force = pressure × area, on the basis the pressure is quoted on: COG and COF pressures on the total bump area (bump count × width × length), FOG and FOB pressures on the bonded area under the tool. A pressure without a basis is refused. With a cylinder bore D the gauge pressure is (force − head weight) / (π D² / 4). 1 kgf = 9.80665 N exactly.',
		sources: [
			{
				citation:
					'Jeng and Hsieh (2001), IEEE Transactions on Components and Packaging Technologies 24(2)',
				note: 'A published COG optimum of 800 kgf/cm² (78.4532 MPa), used as a check value.'
			},
			NIST_SP_811
		],
		safety: [
			PINCH_POINT,
			'Set a new cylinder pressure only as the bonder manual describes: the head moves with the new force at once.',
			HOT_HEAD
		]
	},
	'particle-capture': {
		id: 'particle-capture',
		title: 'Particle capture',
		description:
			'Chance that a bump traps fewer particles than the minimum (an open), per bump and per part, and the density that meets a target.',
		inputs: Object.values(particleCaptureInputs),
		outputs: [
			numberOutput('densityPerMm2', 'Particle density used', 'pcs/mm²', 4),
			numberOutput('meanPerBump', 'Mean particles per bump λ', 'pcs', 4),
			numberOutput('probBumpBelowMin', 'P(one bump below the minimum)', '', 4),
			numberOutput('probAnyBumpBelowMin', 'P(any bump below the minimum)', '', 4),
			numberOutput(
				'requiredDensityPerMm2',
				'Density needed for the target',
				'pcs/mm²',
				4,
				'With a target; empty when out of reach.'
			)
		],
		method:
			'λ = n₀ · A_bump · c, with n₀ the particle density (or φ·t / (π d³ / 6) from the volume fraction), A_bump the bump area and c the capture ratio. The count on a bump is Poisson: P(below k_min) = Σ_{k<k_min} e^(−λ) λ^k / k!, and for N bumps P(any) = 1 − (1 − P)^N, computed with log1p and expm1 so that tiny values stay exact. The density needed is found by bisection on the exact function.',
		sources: [
			{
				citation:
					'Lin, Su and Chang (2005), "The prediction of failure probability in anisotropic conductive adhesive", IEEE Transactions on Device and Materials Reliability 5(2), 255–261',
				note: 'Poisson model of captured particles and the failure probability of a joint.'
			},
			{
				citation: 'Lin, Chang and Fang (2006), Microelectronics Journal',
				note: 'Cited with the 2005 paper for the probability of particle capture on bumps.'
			}
		],
		safety: []
	},
	'bridge-risk': {
		id: 'bridge-risk',
		title: 'Bridge risk',
		description:
			"Chance of a particle bridge (a short) across the gap between neighbouring bumps, from Padbridge's simplified teaching model.",
		inputs: Object.values(bridgeRiskInputs),
		outputs: [
			numberOutput('cellOccupancy', 'Cell occupancy p', '', 4),
			numberOutput('cellsAcross', 'Cells across the gap m', 'cells', 4),
			numberOutput('rows', 'Independent rows R', 'rows', 6),
			numberOutput('probShortPerGap', 'P(short in one gap)', '', 4),
			numberOutput('probAnyShort', 'P(any short)', '', 4),
			numberOutput('gapToDiameterRatio', 'Gap / particle diameter', '', 3)
		],
		method:
			"Padbridge's simplified teaching model, in the spirit of the published box models and not their equations. The gap g between two bumps, over their overlap length L, is a single layer of d × d cells; a cell holds a particle with p = 1 − exp(−n_gap · d²); a short needs a straight row of m = ceil(g / d) occupied cells; there are R = floor(L / d) independent rows. P(gap) = 1 − (1 − p^m)^R and P(any of G gaps) = 1 − (1 − P(gap))^G. It ignores insulating coats, so it is pessimistic for insulated-particle ACF.",
		sources: [
			{
				citation: 'Williams and Whalley (1993)',
				note: 'Box models of particle bridging in ACF gaps, which this simplified model follows in spirit.'
			},
			{
				citation:
					'Lin, Su and Chang (2005), IEEE Transactions on Device and Materials Reliability 5(2), 255–261',
				note: 'A published probability model of ACF joint failures, whose box-model spirit this follows.'
			}
		],
		safety: []
	},
	'cure-degree': {
		id: 'cure-degree',
		title: 'Cure degree',
		description:
			'Degree of cure α of the ACF over a bond-line temperature profile, with the time at which a target is reached.',
		inputs: Object.values(cureDegreeInputs),
		outputs: [
			numberOutput('degreeOfCure', 'Degree of cure at the end', '', 4),
			numberOutput('timeToTargetS', 'Time to the target degree', 's', 4, 'Empty when not reached.'),
			{
				name: 'curve',
				label: 'Cure curve',
				unit: '',
				digits: 4,
				kind: 'series',
				help: 'α and temperature against time, about 100 points.'
			}
		],
		method:
			'Arrhenius k(T) = A · exp(−Ea / RT) with T in kelvin and R = 8.314462618 J/(mol·K). n-th order: dα/dt = k (1 − α)^n; Kamal–Sourour: dα/dt = (k₁ + k₂ α^m)(1 − α)^n, from α = 0. The temperature changes linearly within each segment. The equation is integrated with adaptive Dormand–Prince 5(4) steps to better than 1e-6 in α. The demo kinetics are illustrative, not any real film: use the fit from DSC data for your ACF.',
		sources: [
			{
				citation: 'Kamal and Sourour (1973), Polymer Engineering and Science 13(1), 59–64',
				note: 'The autocatalytic cure kinetics model.'
			},
			{
				citation: 'Sourour and Kamal (1976), Thermochimica Acta 14, 41–59',
				note: 'Cure kinetics of epoxy measured by differential scanning calorimetry.'
			},
			{
				citation: 'Tao, Yin and Xiong (2010), Soldering & Surface Mount Technology',
				note: 'An optimisation study that found the best reliability at 82–85 % cure.'
			},
			{
				citation: 'CODATA 2018 recommended values',
				note: 'Molar gas constant R = 8.314462618 J/(mol·K), exact.'
			}
		],
		safety: [HOT_HEAD, PTFE_FUMES]
	},
	'pitch-compensation': {
		id: 'pitch-compensation',
		title: 'Pitch compensation',
		description:
			'FPC design pitch (pre-shrink) so that its pads land on the glass pads at bonding temperature.',
		inputs: Object.values(pitchCompensationInputs),
		outputs: [
			numberOutput('designPitchMm', 'FPC design pitch', 'mm', 7),
			numberOutput('preShrinkPct', 'Pre-shrink', '%', 4),
			numberOutput('preShrinkPer10k', 'Pre-shrink', '1/10 000', 4),
			numberOutput('spanErrorUm', 'Uncompensated span error', 'µm', 4),
			numberOutput('edgeOffsetUm', 'Uncompensated edge offset', 'µm', 4, 'Aligned at the centre.')
		],
		method:
			'Linear thermal expansion L = L₀ (1 + α ΔT) for the FPC and the glass. Design FPC pitch P_f0 = P_g0 · (1 + α_g ΔT_g) / (1 + α_f ΔT_f); pre-shrink s = 1 − P_f0 / P_g0. Uncompensated, the span over N pads is off by (N − 1) · P_g0 · [(1 + α_f ΔT_f) / (1 + α_g ΔT_g) − 1], half of it at each edge when aligned at the centre. The CTE presets are handbook values; the material data sheets govern.',
		sources: [
			{
				citation: 'Linear thermal expansion, L = L₀ (1 + α ΔT) (textbook physics)',
				note: "The CTE presets are handbook values from memory, except polyimide (a common PI film's data sheet)."
			}
		],
		safety: []
	},
	'head-offset': {
		id: 'head-offset',
		title: 'Head offset',
		description:
			'Head set-point for a target bond-line temperature, from a thermocouple calibration, with the optional lag time.',
		inputs: Object.values(headOffsetInputs),
		outputs: [
			numberOutput('slope', 'Slope b', '', 4),
			numberOutput('interceptC', 'Intercept a', '°C', 4),
			numberOutput('requiredSetpointC', 'Required set-point', '°C', 4),
			numberOutput('rSquared', 'R²', '', 4),
			numberOutput('timeToReachS', 'Time to reach', 's', 3, 'When the lag inputs are given.')
		],
		method:
			'Least-squares fit of the measured bond-line temperature against the set-point, T_acf = a + b · T_set; the set-point for a target is (T_target − a) / b. With a first-order lag of time constant τ, the time to climb from T₀ to T_x toward T_ss is −τ · ln(1 − (T_x − T₀) / (T_ss − T₀)).',
		sources: [
			{
				citation: 'Ordinary least squares and the first-order step response (textbook)',
				note: 'No published process values are involved; the calibration data are your own.'
			}
		],
		safety: [
			HOT_HEAD,
			PINCH_POINT,
			'Place and remove the thermocouple only with the head raised and locked as the plant rules require.'
		]
	},
	units: {
		id: 'units',
		title: 'Units',
		description:
			'Force, pressure, peel strength, temperature and length between the units used on bonders and data sheets.',
		inputs: Object.values(unitsInputs),
		outputs: [numberOutput('value', 'Converted value', '', 10)],
		method:
			'Exact factors: 1 kgf = 9.80665 N, 1 kgf/cm² = 98 066.5 Pa, 1 kgf/mm² = 9.80665 MPa, 1 lbf = 4.4482216152605 N, 1 psi = 6894.757293168361 Pa, 1 bar = 100 000 Pa, 1 gf/cm = 0.00980665 N/cm, 1 in = 25.4 mm, 1 mil = 25.4 µm; T(K) = T(°C) + 273.15, T(°F) = 1.8 · T(°C) + 32. Units of different quantities are never mixed.',
		sources: [
			NIST_SP_811,
			{
				citation: '3rd CGPM (1901)',
				note: 'Standard acceleration of gravity 9.80665 m/s², which fixes the kilogram-force.'
			}
		],
		safety: []
	}
};

const engines: { [I in CalculatorId]: Engine<I> } = {
	'bond-force': { schema: bondForceSchema, compute: computeBondForce },
	'particle-capture': { schema: particleCaptureSchema, compute: computeParticleCapture },
	'bridge-risk': { schema: bridgeRiskSchema, compute: computeBridgeRisk },
	'cure-degree': { schema: cureDegreeSchema, compute: computeCureDegree },
	'pitch-compensation': { schema: pitchCompensationSchema, compute: computePitchCompensation },
	'head-offset': { schema: headOffsetSchema, compute: computeHeadOffset },
	units: { schema: unitsSchema, compute: computeUnits }
};

export type RunResult<O> =
	| { ok: true; outputs: O; warnings: string[] }
	| { ok: false; error: string; fields: Record<string, string> };

function invalid(fields: Record<string, string>): {
	ok: false;
	error: string;
	fields: Record<string, string>;
} {
	const messages = Object.values(fields);
	const more = messages.length > 1 ? ` (and ${messages.length - 1} more)` : '';
	return { ok: false, error: `Invalid input: ${messages[0]}${more}`, fields };
}

/** Validates raw input (JSON body or form values) and runs one calculator. Never throws for bad input. */
export function runCalculator<I extends CalculatorId>(
	id: I,
	rawInput: unknown
): RunResult<CalculatorOutputs[I]>;
export function runCalculator(id: string, rawInput: unknown): RunResult<Record<string, unknown>>;
export function runCalculator(id: string, rawInput: unknown): RunResult<unknown> {
	if (!isCalculatorId(id)) {
		return { ok: false, error: `Unknown calculator "${id}"`, fields: {} };
	}
	if (rawInput === null || typeof rawInput !== 'object' || Array.isArray(rawInput)) {
		return { ok: false, error: 'The input must be an object of named values', fields: {} };
	}
	const engine = engines[id] as Engine<CalculatorId>;
	const parsed = engine.schema.safeParse(rawInput);
	if (!parsed.success) return invalid(issuesToFields(parsed.error.issues));
	let result: CalculatorResult<unknown>;
	try {
		result = (engine.compute as (input: unknown) => CalculatorResult<unknown>)(parsed.data);
	} catch (error) {
		if (error instanceof CalculatorInputError) {
			return { ok: false, error: error.message, fields: error.fields };
		}
		throw error;
	}
	const badPath = findNonFinite(result.outputs);
	if (badPath !== null) {
		return {
			ok: false,
			error: 'These inputs give a result that is not a finite number; check their magnitudes',
			fields: { [badPath]: 'The result is not a finite number for these inputs' }
		};
	}
	return { ok: true, outputs: result.outputs, warnings: result.warnings };
}

/** The registry entry of each calculator, in display order. */
export function listCalculators(): CalculatorDef[] {
	return calculatorIds.map((id) => calculators[id]);
}

/** Default input values of a calculator, as a page or preset block starts from. */
export function defaultInputs(id: CalculatorId): Record<string, unknown> {
	const values: Record<string, unknown> = {};
	for (const input of calculators[id].inputs) {
		if (input.default !== undefined) {
			values[input.name] =
				input.kind === 'list' ? input.default.map((item) => ({ ...item })) : input.default;
		}
	}
	return values;
}
