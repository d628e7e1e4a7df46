import { z } from 'zod';
import {
	numberSchema,
	selectSchema,
	type CalculatorResult,
	type NumberInputDef,
	type SelectInputDef
} from './fields';

// NIST SP 811 (2008), Appendix B.8/B.9; standard gravity fixed by the CGPM in 1901. All exact.
export const KGF_N = 9.80665;
export const GF_N = 0.00980665;
export const LBF_N = 4.4482216152605;
export const KGF_PER_CM2_PA = 98066.5;
export const KGF_PER_MM2_PA = 9806650;
export const PSI_PA = 6894.757293168361;
export const BAR_PA = 100000;
export const INCH_M = 0.0254;
export const MIL_M = 0.0000254;
/** Molar gas constant, CODATA 2018 (exact since the 2019 SI). */
export const GAS_CONSTANT_J_PER_MOL_K = 8.314462618;
export const ZERO_CELSIUS_K = 273.15;

export const quantities = ['force', 'pressure', 'peel-strength', 'temperature', 'length'] as const;
export type Quantity = (typeof quantities)[number];

/** Each linear unit's size in the quantity's base unit (N, Pa, N/m, m). */
const linearFactors = {
	force: { N: 1, kgf: KGF_N, gf: GF_N, lbf: LBF_N },
	pressure: {
		Pa: 1,
		kPa: 1000,
		MPa: 1e6,
		bar: BAR_PA,
		'kgf/cm²': KGF_PER_CM2_PA,
		'kgf/mm²': KGF_PER_MM2_PA,
		psi: PSI_PA
	},
	'peel-strength': { 'N/cm': 100, 'N/m': 1, 'gf/cm': GF_N * 100, 'gf/mm': GF_N * 1000 },
	length: { µm: 1e-6, mm: 1e-3, mil: MIL_M, in: INCH_M }
} as const;

const temperatureUnits = ['°C', '°F', 'K'] as const;
type TemperatureUnit = (typeof temperatureUnits)[number];

/** Every unit symbol with the quantity it measures. */
export const unitsByQuantity: Record<Quantity, readonly string[]> = {
	force: Object.keys(linearFactors.force),
	pressure: Object.keys(linearFactors.pressure),
	'peel-strength': Object.keys(linearFactors['peel-strength']),
	temperature: temperatureUnits,
	length: Object.keys(linearFactors.length)
};

const quantityLabels: Record<Quantity, string> = {
	force: 'force',
	pressure: 'pressure',
	'peel-strength': 'peel strength',
	temperature: 'temperature',
	length: 'length'
};

const unitOptions = quantities.flatMap((quantity) =>
	unitsByQuantity[quantity].map((unit) => ({ value: unit, label: unit, group: quantity }))
);

// Keyboards rarely have µ, ² or °; the Greek mu (U+03BC) also looks the same as the micro sign.
const unitAliases: Record<string, string> = {
	um: 'µm',
	μm: 'µm',
	'kgf/cm2': 'kgf/cm²',
	'kgf/mm2': 'kgf/mm²',
	C: '°C',
	degC: '°C',
	'℃': '°C',
	F: '°F',
	degF: '°F',
	'℉': '°F',
	inch: 'in'
};

export const unitsInputs = {
	quantity: {
		kind: 'select',
		name: 'quantity',
		label: 'Quantity',
		unit: '',
		options: quantities.map((quantity) => ({ value: quantity, label: quantityLabels[quantity] })),
		default: 'pressure',
		aliases: { peelStrength: 'peel-strength', peel: 'peel-strength' },
		help: 'What is being converted; units of different quantities are never mixed.'
	},
	value: {
		kind: 'number',
		name: 'value',
		label: 'Value',
		unit: '',
		default: 800,
		min: -1e12,
		max: 1e12,
		step: 0.001,
		help: 'The number to convert, in the "from" unit.'
	},
	from: {
		kind: 'select',
		name: 'from',
		label: 'From unit',
		unit: '',
		options: unitOptions,
		default: 'kgf/cm²',
		aliases: unitAliases,
		help: 'The unit the value is given in.'
	},
	to: {
		kind: 'select',
		name: 'to',
		label: 'To unit',
		unit: '',
		options: unitOptions,
		default: 'MPa',
		aliases: unitAliases,
		help: 'The unit to convert to; it must measure the same quantity.'
	}
} satisfies {
	quantity: SelectInputDef;
	value: NumberInputDef;
	from: SelectInputDef;
	to: SelectInputDef;
};

/** The quantity a unit symbol measures, or null for an unknown symbol. */
export function quantityOfUnit(unit: string): Quantity | null {
	for (const quantity of quantities) {
		if (unitsByQuantity[quantity].includes(unit)) return quantity;
	}
	return null;
}

function toKelvin(value: number, unit: TemperatureUnit): number {
	if (unit === 'K') return value;
	if (unit === '°C') return value + ZERO_CELSIUS_K;
	return ((value - 32) * 5) / 9 + ZERO_CELSIUS_K;
}

function fromKelvin(kelvin: number, unit: TemperatureUnit): number {
	if (unit === 'K') return kelvin;
	if (unit === '°C') return kelvin - ZERO_CELSIUS_K;
	return ((kelvin - ZERO_CELSIUS_K) * 9) / 5 + 32;
}

function convertTemperature(value: number, from: TemperatureUnit, to: TemperatureUnit): number {
	if (from === to) return value;
	// Celsius ↔ Fahrenheit directly, so that 100 °C gives exactly 212 °F.
	if (from === '°C' && to === '°F') return (value * 9) / 5 + 32;
	if (from === '°F' && to === '°C') return ((value - 32) * 5) / 9;
	return fromKelvin(toKelvin(value, from), to);
}

/** Converts a value between two units of one quantity; throws for unknown or mixed units. */
export function convertUnit(quantity: Quantity, value: number, from: string, to: string): number {
	if (quantity === 'temperature') {
		const known = temperatureUnits as readonly string[];
		if (!known.includes(from) || !known.includes(to)) {
			throw new RangeError(`Unknown temperature unit ${known.includes(from) ? to : from}`);
		}
		return convertTemperature(value, from as TemperatureUnit, to as TemperatureUnit);
	}
	const factors = linearFactors[quantity] as Readonly<Record<string, number>>;
	const fromFactor = factors[from];
	const toFactor = factors[to];
	if (fromFactor === undefined || toFactor === undefined) {
		throw new RangeError(`Unknown ${quantity} unit ${fromFactor === undefined ? from : to}`);
	}
	if (from === to) return value;
	return (value * fromFactor) / toFactor;
}

function describeMismatch(unit: string, quantity: Quantity): string {
	const actual = quantityOfUnit(unit);
	return actual
		? `${unit} is a ${quantityLabels[actual]} unit, not a ${quantityLabels[quantity]} unit`
		: `${unit} is not a known unit`;
}

export const unitsSchema = z
	.object({
		quantity: selectSchema(unitsInputs.quantity),
		value: numberSchema(unitsInputs.value),
		from: selectSchema(unitsInputs.from),
		to: selectSchema(unitsInputs.to)
	})
	.superRefine((input, ctx) => {
		const allowed = unitsByQuantity[input.quantity as Quantity];
		for (const key of ['from', 'to'] as const) {
			if (!allowed.includes(input[key])) {
				ctx.addIssue({
					code: 'custom',
					path: [key],
					message: describeMismatch(input[key], input.quantity as Quantity)
				});
			}
		}
		if (input.quantity === 'temperature' && allowed.includes(input.from)) {
			if (toKelvin(input.value, input.from as TemperatureUnit) < 0) {
				ctx.addIssue({ code: 'custom', path: ['value'], message: 'Value is below absolute zero' });
			}
		}
	});

export type UnitsInput = z.output<typeof unitsSchema>;

export interface UnitsOutput {
	value: number;
}

export function computeUnits(input: UnitsInput): CalculatorResult<UnitsOutput> {
	const value = convertUnit(input.quantity as Quantity, input.value, input.from, input.to);
	return { outputs: { value }, warnings: [] };
}
