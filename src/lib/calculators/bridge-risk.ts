import { z } from 'zod';
import { numberSchema, oneMinusExp, type CalculatorResult, type NumberInputDef } from './fields';

export const bridgeRiskInputs = {
	gapDensityPerMm2: {
		kind: 'number',
		name: 'gapDensityPerMm2',
		label: 'Particle density in the gap',
		unit: 'pcs/mm²',
		default: 10000,
		min: 0,
		max: 1000000,
		step: 100,
		help: 'Particles per mm² between the bumps after bonding; resin flow can push it above the film density.'
	},
	particleDiameterUm: {
		kind: 'number',
		name: 'particleDiameterUm',
		label: 'Particle diameter',
		unit: 'µm',
		default: 3,
		min: 0,
		minExclusive: true,
		max: 50,
		step: 0.1,
		help: 'Conductive particle diameter.'
	},
	gapUm: {
		kind: 'number',
		name: 'gapUm',
		label: 'Gap between bumps',
		unit: 'µm',
		default: 20,
		min: 0,
		minExclusive: true,
		max: 1000,
		step: 0.1,
		help: 'Edge-to-edge space between two neighbouring bumps.'
	},
	overlapLengthUm: {
		kind: 'number',
		name: 'overlapLengthUm',
		label: 'Overlap length',
		unit: 'µm',
		default: 100,
		min: 0,
		minExclusive: true,
		max: 100000,
		step: 1,
		help: 'Length over which the two bumps face each other.'
	},
	gapCount: {
		kind: 'number',
		name: 'gapCount',
		label: 'Gap count',
		unit: 'pcs',
		default: 1200,
		min: 1,
		max: 10000000,
		integer: true,
		step: 1,
		help: 'Neighbouring-bump gaps per part (about the bump count).'
	}
} satisfies Record<string, NumberInputDef>;

const i = bridgeRiskInputs;

export const bridgeRiskSchema = z.object({
	gapDensityPerMm2: numberSchema(i.gapDensityPerMm2),
	particleDiameterUm: numberSchema(i.particleDiameterUm),
	gapUm: numberSchema(i.gapUm),
	overlapLengthUm: numberSchema(i.overlapLengthUm),
	gapCount: numberSchema(i.gapCount)
});

export type BridgeRiskInput = z.output<typeof bridgeRiskSchema>;

export interface BridgeRiskOutput {
	cellOccupancy: number;
	cellsAcross: number;
	rows: number;
	probShortPerGap: number;
	probAnyShort: number;
	gapToDiameterRatio: number;
}

// Decimal inputs divide inexactly (0.3 / 0.1 is 2.9999999999999996); that must still count as 3.
const RATIO_SLACK = 1e-9;

/** log(1 − e^x) for x ≤ 0, accurate at both ends (Mächler's log1mexp). */
function log1mExp(x: number): number {
	return x > -Math.LN2 ? Math.log(-Math.expm1(x)) : Math.log1p(-Math.exp(x));
}

export function computeBridgeRisk(input: BridgeRiskInput): CalculatorResult<BridgeRiskOutput> {
	const warnings: string[] = [];
	const diameterMm = input.particleDiameterUm / 1000;
	const gapToDiameterRatio = input.gapUm / input.particleDiameterUm;
	const cellsAcross = Math.max(1, Math.ceil(gapToDiameterRatio - RATIO_SLACK));
	const rows = Math.floor(input.overlapLengthUm / input.particleDiameterUm + RATIO_SLACK);
	const meanPerCell = input.gapDensityPerMm2 * diameterMm * diameterMm;
	const cellOccupancy = oneMinusExp(-meanPerCell);
	// Work with log(1 − …) throughout: p^m and the per-gap probability can be far below 1e-16.
	const logRowBridged = cellsAcross * Math.log(cellOccupancy);
	const logGapClear = rows === 0 ? 0 : rows * log1mExp(logRowBridged);
	const probShortPerGap = oneMinusExp(logGapClear);
	const probAnyShort = oneMinusExp(input.gapCount * logGapClear);
	if (gapToDiameterRatio < 3 - RATIO_SLACK) {
		warnings.push(
			'The gap is less than three particle diameters: a few particles can bridge it. Use a finer particle or an insulated-particle ACF, and check with the ACF maker.'
		);
	}
	if (rows === 0) {
		warnings.push('The overlap is shorter than one particle diameter, so no row of cells fits.');
	}
	return {
		outputs: {
			cellOccupancy,
			cellsAcross,
			rows,
			probShortPerGap,
			probAnyShort,
			gapToDiameterRatio
		},
		warnings
	};
}
