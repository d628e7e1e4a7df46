import { z } from 'zod';
import {
	optionalNumberSchema,
	selectSchema,
	type CalculatorResult,
	type NumberInputDef,
	type SelectInputDef
} from './fields';
import { KGF_N } from './units';

export const bondForceBases = ['bump', 'tool', 'acf', 'lead'] as const;
export type BondForceBasis = (typeof bondForceBases)[number];

const onBump = { input: 'basis', equals: ['bump'] } as const;
const onRectangle = { input: 'basis', equals: ['tool', 'acf', 'lead'] } as const;

export const bondForceInputs = {
	basis: {
		kind: 'select',
		name: 'basis',
		label: 'Area basis',
		unit: '',
		options: [
			{ value: 'bump', label: 'Total bump area (COG, COF)' },
			{ value: 'tool', label: 'Bonded area under the tool (FOG, FOB)' },
			{ value: 'acf', label: 'ACF area under the tool' },
			{ value: 'lead', label: 'Lead area' }
		],
		default: 'bump',
		requiredMessage: 'Choose the area basis the pressure is quoted on',
		help: 'The area a quoted pressure refers to. COG and COF pressures are quoted on the total bump area (tens of MPa), FOG and FOB pressures on the bonded area under the tool (a few MPa).'
	},
	bumpCount: {
		kind: 'number',
		name: 'bumpCount',
		label: 'Bump count',
		unit: 'pcs',
		default: 1200,
		min: 1,
		max: 1000000,
		integer: true,
		step: 1,
		optional: true,
		when: onBump,
		help: 'Bumps that carry the bond force (all bumps of the chip, including dummies).'
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
		optional: true,
		when: onBump,
		help: 'Bump width across the pitch direction, from the chip drawing.'
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
		optional: true,
		when: onBump,
		help: 'Bump length along the lead, from the chip drawing.'
	},
	widthMm: {
		kind: 'number',
		name: 'widthMm',
		label: 'Width',
		unit: 'mm',
		default: 1.5,
		min: 0,
		minExclusive: true,
		max: 1000,
		step: 0.01,
		optional: true,
		when: onRectangle,
		help: 'Width of the area on the chosen basis (for example the bonded width under the tool).'
	},
	lengthMm: {
		kind: 'number',
		name: 'lengthMm',
		label: 'Length',
		unit: 'mm',
		default: 30,
		min: 0,
		minExclusive: true,
		max: 1000,
		step: 0.01,
		optional: true,
		when: onRectangle,
		help: 'Length of the area on the chosen basis (for example the bonded length of the FPC).'
	},
	pressureMPa: {
		kind: 'number',
		name: 'pressureMPa',
		label: 'Pressure',
		unit: 'MPa',
		default: 80,
		min: 0,
		minExclusive: true,
		max: 1000,
		step: 0.1,
		optional: true,
		help: 'Bond pressure on the chosen basis. Give either a pressure or a force.'
	},
	forceN: {
		kind: 'number',
		name: 'forceN',
		label: 'Force',
		unit: 'N',
		min: 0,
		minExclusive: true,
		max: 100000,
		step: 0.1,
		optional: true,
		help: 'Total bond force on the head. Give either a pressure or a force.'
	},
	cylinderBoreMm: {
		kind: 'number',
		name: 'cylinderBoreMm',
		label: 'Cylinder bore',
		unit: 'mm',
		min: 0,
		minExclusive: true,
		max: 500,
		step: 0.1,
		optional: true,
		help: 'Bore of the head cylinder on a pneumatic bonder; gives the gauge pressure to set.'
	},
	headWeightN: {
		kind: 'number',
		name: 'headWeightN',
		label: 'Head weight',
		unit: 'N',
		default: 0,
		min: 0,
		max: 10000,
		step: 0.1,
		optional: true,
		help: 'Weight of the moving head that presses down on its own; the cylinder supplies the rest.'
	}
} satisfies Record<string, NumberInputDef | SelectInputDef>;

const i = bondForceInputs;

export const bondForceSchema = z
	.object({
		basis: selectSchema(i.basis),
		bumpCount: optionalNumberSchema(i.bumpCount),
		bumpWidthUm: optionalNumberSchema(i.bumpWidthUm),
		bumpLengthUm: optionalNumberSchema(i.bumpLengthUm),
		widthMm: optionalNumberSchema(i.widthMm),
		lengthMm: optionalNumberSchema(i.lengthMm),
		pressureMPa: optionalNumberSchema(i.pressureMPa),
		forceN: optionalNumberSchema(i.forceN),
		cylinderBoreMm: optionalNumberSchema(i.cylinderBoreMm),
		headWeightN: optionalNumberSchema(i.headWeightN)
	})
	.superRefine((input, ctx) => {
		const required =
			input.basis === 'bump'
				? (['bumpCount', 'bumpWidthUm', 'bumpLengthUm'] as const)
				: (['widthMm', 'lengthMm'] as const);
		const basisLabel = i.basis.options.find((option) => option.value === input.basis)?.label;
		for (const key of required) {
			if (input[key] === undefined) {
				ctx.addIssue({
					code: 'custom',
					path: [key],
					message: `${i[key].label} is required for the basis "${basisLabel}"`
				});
			}
		}
		const hasPressure = input.pressureMPa !== undefined;
		const hasForce = input.forceN !== undefined;
		if (hasPressure === hasForce) {
			const message = hasPressure
				? 'Give either a pressure or a force, not both'
				: 'Enter a pressure or a force';
			ctx.addIssue({ code: 'custom', path: ['pressureMPa'], message });
			ctx.addIssue({ code: 'custom', path: ['forceN'], message });
		}
	});

export type BondForceInput = z.output<typeof bondForceSchema>;

export interface BondForceOutput {
	areaMm2: number;
	pressureMPa: number;
	forceN: number;
	forceKgf: number;
	forcePerBumpMN?: number;
	cylinderGaugeMPa?: number;
	cylinderGaugeBar?: number;
}

// Planning bands, common practice: COG/COF tens of MPa on bump area, FOG/FOB a few MPa on tool area.
const BUMP_BASIS_TYPICAL_MPA = [20, 150] as const;
const TOOL_BASIS_TYPICAL_MAX_MPA = 20;

/** Bonded area on the chosen basis, in mm². */
export function bondAreaMm2(input: BondForceInput): number {
	if (input.basis === 'bump') {
		return (
			(input.bumpCount as number) *
			(input.bumpWidthUm as number) *
			(input.bumpLengthUm as number) *
			1e-6
		);
	}
	return (input.widthMm as number) * (input.lengthMm as number);
}

export function computeBondForce(input: BondForceInput): CalculatorResult<BondForceOutput> {
	const warnings: string[] = [];
	const areaMm2 = bondAreaMm2(input);
	// 1 MPa = 1 N/mm², so no unit factor is needed between the two.
	const forceN = input.forceN ?? (input.pressureMPa as number) * areaMm2;
	const pressureMPa = input.pressureMPa ?? forceN / areaMm2;
	const outputs: BondForceOutput = {
		areaMm2,
		pressureMPa,
		forceN,
		forceKgf: forceN / KGF_N
	};
	if (input.basis === 'bump') {
		outputs.forcePerBumpMN = (forceN / (input.bumpCount as number)) * 1000;
		if (pressureMPa < BUMP_BASIS_TYPICAL_MPA[0] || pressureMPa > BUMP_BASIS_TYPICAL_MPA[1]) {
			warnings.push(
				`${round(pressureMPa)} MPa is outside the usual ${BUMP_BASIS_TYPICAL_MPA[0]}–${BUMP_BASIS_TYPICAL_MPA[1]} MPa for COG/COF on the total bump area; check the basis and the ACF data sheet.`
			);
		}
	} else if (pressureMPa > TOOL_BASIS_TYPICAL_MAX_MPA) {
		warnings.push(
			`${round(pressureMPa)} MPa is high for a pressure on the bonded area (FOG/FOB are usually a few MPa); check whether it was quoted on the bump area.`
		);
	}
	const headWeightN = input.headWeightN ?? 0;
	if (input.cylinderBoreMm !== undefined) {
		const boreAreaMm2 = (Math.PI * input.cylinderBoreMm ** 2) / 4;
		outputs.cylinderGaugeMPa = (forceN - headWeightN) / boreAreaMm2;
		outputs.cylinderGaugeBar = outputs.cylinderGaugeMPa * 10;
		if (outputs.cylinderGaugeMPa < 0) {
			warnings.push(
				'The head weight alone exceeds the bond force: the cylinder would have to lift the head (negative gauge pressure). Check the counterbalance in the bonder manual.'
			);
		}
	} else if (headWeightN > 0) {
		warnings.push(
			'Head weight is only used with a cylinder bore; enter the bore to get a gauge pressure.'
		);
	}
	return { outputs, warnings };
}

function round(value: number): string {
	return String(Number(value.toPrecision(3)));
}
