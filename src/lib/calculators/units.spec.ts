import { describe, expect, it } from 'vitest';
import { runCalculator } from './registry';
import { convertUnit, quantities, unitsByQuantity, type Quantity } from './units';

/** Relative difference, so one tolerance serves values of any size. */
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

function convert(quantity: string, value: number | string, from: string, to: string): number {
	const result = runCalculator('units', { quantity, value, from, to });
	if (!result.ok) throw new Error(result.error);
	return result.outputs.value;
}

describe('units: exact factors', () => {
	// [quantity, from, to, expected value of 1 `from` in `to`, where the expected value comes from]
	const cases: [Quantity, string, string, number, string][] = [
		['force', 'kgf', 'N', 9.80665, 'NIST SP 811 (2008) B.8, exact'],
		['force', 'gf', 'N', 0.00980665, 'NIST SP 811 (2008) B.8, exact'],
		['force', 'lbf', 'N', 4.4482216152605, 'NIST SP 811 (2008) B.8, exact'],
		['pressure', 'kgf/cm²', 'Pa', 98066.5, 'NIST SP 811 (2008) B.8, exact'],
		['pressure', 'kgf/mm²', 'MPa', 9.80665, 'NIST SP 811 (2008) B.8, exact'],
		['pressure', 'psi', 'Pa', 6894.757293168361, 'NIST SP 811 (2008) B.8 (6.894757 E+03)'],
		['pressure', 'bar', 'Pa', 100000, 'NIST SP 811 (2008) B.8, exact'],
		['pressure', 'kPa', 'Pa', 1000, 'SI prefix, exact'],
		['pressure', 'MPa', 'kPa', 1000, 'SI prefix, exact'],
		['peel-strength', 'gf/cm', 'N/cm', 0.00980665, 'NIST SP 811 (2008) via 1 gf, exact'],
		['peel-strength', 'N/cm', 'N/m', 100, 'SI prefix, exact'],
		['peel-strength', 'gf/mm', 'N/m', 9.80665, 'NIST SP 811 (2008) via 1 gf, exact'],
		['length', 'in', 'mm', 25.4, 'NIST SP 811 (2008) B.8, exact'],
		['length', 'mil', 'µm', 25.4, 'NIST SP 811 (2008) B.8 (1 mil = 1e-3 in), exact'],
		['length', 'mm', 'µm', 1000, 'SI prefix, exact']
	];

	for (const [quantity, from, to, expected, source] of cases) {
		it(`1 ${from} = ${expected} ${to} (${source})`, () => {
			expect(relativeError(convert(quantity, 1, from, to), expected)).toBeLessThan(1e-15);
			expect(relativeError(convert(quantity, 1, to, from), 1 / expected)).toBeLessThan(1e-15);
		});
	}

	it('derives lbf and psi from the pound and the inch', () => {
		// 1 lb = 0.45359237 kg and 1 in = 0.0254 m exactly (NIST SP 811 B.8, 1959 agreement)
		const lbfN = 0.45359237 * 9.80665;
		expect(relativeError(convert('force', 1, 'lbf', 'N'), lbfN)).toBeLessThan(1e-15);
		expect(relativeError(convert('pressure', 1, 'psi', 'Pa'), lbfN / 0.0254 ** 2)).toBeLessThan(
			1e-15
		);
	});

	it('converts the Jeng & Hsieh COG optimum', () => {
		// 800 kgf/cm² = 78.4532 MPa: Jeng & Hsieh (2001), IEEE Trans. Compon. Packag. Technol. 24(2)
		expect(relativeError(convert('pressure', 800, 'kgf/cm²', 'MPa'), 78.4532)).toBeLessThan(1e-15);
	});

	it('converts temperatures on the defined scales', () => {
		// 0 °C = 273.15 K and 1 K = 1.8 °F in size, by definition of the scales (NIST SP 811 4.2.1.1)
		expect(convert('temperature', 0, '°C', 'K')).toBeCloseTo(273.15, 12);
		expect(convert('temperature', 100, '°C', '°F')).toBe(212); // boiling point of water, from memory
		expect(convert('temperature', -40, '°C', '°F')).toBe(-40); // the scales cross at −40, from memory
		expect(convert('temperature', 32, '°F', '°C')).toBe(0); // freezing point of water, from memory
		expect(convert('temperature', 0, 'K', '°F')).toBeCloseTo(-459.67, 10); // absolute zero, from memory
		expect(convert('temperature', 185, '°C', 'K')).toBeCloseTo(458.15, 10); // 185 + 273.15 by definition
	});

	it('accepts numeric strings and ASCII spellings of the units', () => {
		// 800 kgf/cm² = 78.4532 MPa (Jeng & Hsieh 2001), entered from a keyboard without ²
		expect(convert('pressure', '800', 'kgf/cm2', 'MPa')).toBeCloseTo(78.4532, 12);
		// 1 mil = 25.4 µm exactly (NIST SP 811), with 'um' for µm and the Greek mu for the micro sign
		expect(convert('length', 1, 'mil', 'um')).toBeCloseTo(25.4, 12);
		expect(convert('length', 1, 'mil', 'μm')).toBeCloseTo(25.4, 12);
		expect(convert('temperature', '100', 'C', 'F')).toBe(212); // from memory
	});
});

describe('units: properties', () => {
	it('round-trips every pair of units of each quantity', () => {
		const random = mulberry32(811);
		for (const quantity of quantities) {
			const units = unitsByQuantity[quantity];
			for (const from of units) {
				for (const to of units) {
					// Positive values well above absolute zero in every temperature scale
					const value = 1 + random() * 999;
					const back = convertUnit(quantity, convertUnit(quantity, value, from, to), to, from);
					expect(relativeError(back, value)).toBeLessThan(1e-13);
				}
			}
		}
	});

	it('is linear for force, pressure, peel strength and length', () => {
		const random = mulberry32(2008);
		for (const quantity of ['force', 'pressure', 'peel-strength', 'length'] as const) {
			const units = unitsByQuantity[quantity];
			for (let trial = 0; trial < 50; trial++) {
				const from = units[Math.floor(random() * units.length)];
				const to = units[Math.floor(random() * units.length)];
				const value = random() * 1000;
				const scale = 1 + random() * 10;
				const once = convertUnit(quantity, value, from, to);
				const scaled = convertUnit(quantity, value * scale, from, to);
				expect(relativeError(scaled, once * scale)).toBeLessThan(1e-13);
			}
		}
	});
});

describe('units: refused input', () => {
	it('refuses a conversion across quantities', () => {
		const result = runCalculator('units', {
			quantity: 'pressure',
			value: 1,
			from: 'kgf',
			to: 'MPa'
		});
		expect(result.ok).toBe(false);
		if (result.ok) return;
		expect(result.fields.from).toMatch(/force unit, not a pressure unit/);
		expect(result.fields.to).toBeUndefined();
	});

	it('refuses unknown units and quantities', () => {
		const result = runCalculator('units', {
			quantity: 'energy',
			value: 1,
			from: 'J',
			to: 'furlong'
		});
		expect(result.ok).toBe(false);
		if (result.ok) return;
		expect(Object.keys(result.fields).sort()).toEqual(['from', 'quantity', 'to']);
		expect(() => convertUnit('force', 1, 'N', 'stone')).toThrow(RangeError);
		expect(() => convertUnit('temperature', 1, '°C', '°R')).toThrow(RangeError);
	});

	it('refuses temperatures below absolute zero', () => {
		const result = runCalculator('units', {
			quantity: 'temperature',
			value: -300,
			from: '°C',
			to: 'K'
		});
		expect(result.ok).toBe(false);
		if (result.ok) return;
		expect(result.fields.value).toMatch(/absolute zero/);
	});

	it('refuses empty, missing and non-numeric values', () => {
		const cases: [unknown, RegExp][] = [
			['', /empty/],
			[undefined, /required/],
			['12,5', /must be a number/],
			['0x10', /must be a number/],
			['Infinity', /must be a number/],
			[Number.NaN, /finite/],
			[true, /must be a number/]
		];
		for (const [value, message] of cases) {
			const result = runCalculator('units', { quantity: 'force', value, from: 'N', to: 'kgf' });
			expect(result.ok, String(value)).toBe(false);
			if (result.ok) continue;
			expect(result.fields.value).toMatch(message);
		}
	});
});
