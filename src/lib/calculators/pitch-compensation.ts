import { z } from 'zod';
import { numberSchema, type CalculatorResult, type NumberInputDef } from './fields';

// Handbook values, from memory unless noted; offered as presets, never as a substitute for the
// material's own data sheet.
const fpcCteSuggestions = [
	{ label: "Polyimide film (a common PI film's data sheet)", value: 20 },
	{ label: 'Copper', value: 17 },
	{ label: 'FR-4, in-plane (14–17)', value: 16 }
] as const;

const glassCteSuggestions = [
	{ label: 'Alkali-free display glass', value: 3.2 },
	{ label: 'Borosilicate glass', value: 3.25 },
	{ label: 'Soda-lime glass', value: 9 }
] as const;

export const pitchCompensationInputs = {
	glassPitchMm: {
		kind: 'number',
		name: 'glassPitchMm',
		label: 'Glass pad pitch',
		unit: 'mm',
		default: 0.05,
		min: 0,
		minExclusive: true,
		max: 10,
		step: 0.001,
		help: 'Pad pitch on the glass at room temperature, from the panel drawing.'
	},
	padCount: {
		kind: 'number',
		name: 'padCount',
		label: 'Pad count',
		unit: 'pcs',
		default: 400,
		min: 2,
		max: 100000,
		integer: true,
		step: 1,
		help: 'Pads in the row; the span is (pad count − 1) pitches.'
	},
	fpcCtePpmPerK: {
		kind: 'number',
		name: 'fpcCtePpmPerK',
		label: 'FPC expansion coefficient',
		unit: 'ppm/K',
		default: 20,
		min: -50,
		max: 200,
		step: 0.1,
		suggestions: fpcCteSuggestions,
		help: "In-plane CTE of the FPC along the pad row, from the FPC maker's data sheet."
	},
	fpcDeltaTK: {
		kind: 'number',
		name: 'fpcDeltaTK',
		label: 'FPC temperature rise',
		unit: 'K',
		default: 150,
		min: -100,
		max: 400,
		step: 1,
		help: 'How far the FPC warms above room temperature at bonding (it sits under the hot head).'
	},
	glassCtePpmPerK: {
		kind: 'number',
		name: 'glassCtePpmPerK',
		label: 'Glass expansion coefficient',
		unit: 'ppm/K',
		default: 3.2,
		min: -50,
		max: 200,
		step: 0.01,
		suggestions: glassCteSuggestions,
		help: "CTE of the panel glass, from the glass maker's data sheet."
	},
	glassDeltaTK: {
		kind: 'number',
		name: 'glassDeltaTK',
		label: 'Glass temperature rise',
		unit: 'K',
		default: 60,
		min: -100,
		max: 400,
		step: 1,
		help: 'How far the glass warms above room temperature at bonding (stage heat and conduction).'
	}
} satisfies Record<string, NumberInputDef>;

const i = pitchCompensationInputs;

export const pitchCompensationSchema = z.object({
	glassPitchMm: numberSchema(i.glassPitchMm),
	padCount: numberSchema(i.padCount),
	fpcCtePpmPerK: numberSchema(i.fpcCtePpmPerK),
	fpcDeltaTK: numberSchema(i.fpcDeltaTK),
	glassCtePpmPerK: numberSchema(i.glassCtePpmPerK),
	glassDeltaTK: numberSchema(i.glassDeltaTK)
});

export type PitchCompensationInput = z.output<typeof pitchCompensationSchema>;

export interface PitchCompensationOutput {
	designPitchMm: number;
	preShrinkPct: number;
	preShrinkPer10k: number;
	spanErrorUm: number;
	edgeOffsetUm: number;
}

export function computePitchCompensation(
	input: PitchCompensationInput
): CalculatorResult<PitchCompensationOutput> {
	const warnings: string[] = [];
	const fpcStrain = input.fpcCtePpmPerK * 1e-6 * input.fpcDeltaTK;
	const glassStrain = input.glassCtePpmPerK * 1e-6 * input.glassDeltaTK;
	// The differences are formed before dividing: 1 − (1 + g)/(1 + f) would cancel away most digits.
	const preShrink = (fpcStrain - glassStrain) / (1 + fpcStrain);
	const designPitchMm = (input.glassPitchMm * (1 + glassStrain)) / (1 + fpcStrain);
	const spanErrorMm =
		((input.padCount - 1) * input.glassPitchMm * (fpcStrain - glassStrain)) / (1 + glassStrain);
	const spanErrorUm = spanErrorMm * 1000;
	if (preShrink < 0) {
		warnings.push(
			'The glass grows more than the FPC at bonding: the FPC pitch must be stretched, not shrunk.'
		);
	}
	// Geometry, not a quality limit: past half a pitch an edge pad faces its neighbour's pad.
	if (Math.abs(spanErrorUm / 2) > (input.glassPitchMm * 1000) / 2) {
		warnings.push(
			'Without compensation the edge pads would be off by more than half a pitch and land on the neighbouring pads.'
		);
	}
	return {
		outputs: {
			designPitchMm,
			preShrinkPct: preShrink * 100,
			preShrinkPer10k: preShrink * 10000,
			spanErrorUm,
			edgeOffsetUm: spanErrorUm / 2
		},
		warnings
	};
}
