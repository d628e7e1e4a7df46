import { describe, expect, it } from 'vitest';
import { CALCULATOR_CAUTION, calculators, runCalculator } from './registry';
import { formatNumber, inputUnit, outputUnit, resultText } from './format';
import { defaultFormValues, toRawInput } from './form-values';

describe('formatNumber', () => {
	it('rounds to significant digits and drops trailing zeros', () => {
		expect(formatNumber(192, 4)).toBe('192');
		expect(formatNumber(78.45320000001, 6)).toBe('78.4532');
		expect(formatNumber(0.124652, 4)).toBe('0.1247');
		expect(formatNumber(999.96, 4)).toBe('1000');
		expect(formatNumber(0.0001, 4)).toBe('0.0001');
	});

	it('groups digits with a narrow space from five digits up', () => {
		expect(formatNumber(1200, 4)).toBe('1200');
		expect(formatNumber(30000, 4)).toBe('30\u202f000');
		expect(formatNumber(1234567, 4)).toBe('1\u202f235\u202f000');
		expect(formatNumber(1234567, 4, { plain: true })).toBe('1235000');
	});

	it('writes tiny and huge values as powers of ten', () => {
		expect(formatNumber(6.737947e-3, 4)).toBe('0.006738');
		expect(formatNumber(1.5e-12, 4)).toBe('1.5 × 10⁻¹²');
		expect(formatNumber(1.5e-12, 4, { plain: true })).toBe('1.5e-12');
		expect(formatNumber(2.5e12, 3)).toBe('2.5 × 10¹²');
		expect(formatNumber(2.5e12, 3, { plain: true })).toBe('2.5e12');
	});

	it('uses a true minus sign on screen and an ASCII one in plain text', () => {
		expect(formatNumber(-28.1, 3)).toBe('\u221228.1');
		expect(formatNumber(-28.1, 3, { plain: true })).toBe('-28.1');
		expect(formatNumber(0, 4)).toBe('0');
		expect(formatNumber(Number.NaN, 4)).toBe('—');
	});
});

describe('units beside fields and results', () => {
	it('show the chosen units of the Units calculator', () => {
		const def = calculators.units;
		const values = defaultFormValues(def);
		expect(inputUnit(def, 'value', values)).toBe('kgf/cm²');
		expect(outputUnit(def, def.outputs[0], values)).toBe('MPa');
		expect(inputUnit(calculators['bond-force'], 'bumpWidthUm', {})).toBe('µm');
	});
});

describe('resultText', () => {
	it('lists inputs, results with units, warnings, the link and the caution', () => {
		const def = calculators['bond-force'];
		const values = { ...defaultFormValues(def), pressureMPa: '10' };
		const result = runCalculator('bond-force', toRawInput(def, values));
		if (!result.ok) throw new Error(result.error);
		const text = resultText(
			def,
			values,
			result.outputs,
			result.warnings,
			'http://x/calculators/bond-force?pressureMPa=10',
			CALCULATOR_CAUTION
		);
		expect(text).toContain('Bond force (Padbridge calculator)');
		expect(text).toContain('  Area basis: Total bump area (COG, COF)');
		expect(text).toContain('  Bump width: 20 µm');
		// 10 MPa × 2.4 mm² = 24 N; 24 / 9.80665 = 2.447319 kgf (NIST SP 811 factor)
		expect(text).toContain('  Force: 24 N');
		expect(text).toContain('  Force: 2.447 kgf');
		expect(text).toMatch(/Warnings\n {2}- 10 MPa is outside the usual/);
		expect(text).toContain('Inputs link: http://x/calculators/bond-force?pressureMPa=10');
		expect(text.endsWith(CALCULATOR_CAUTION)).toBe(true);
		expect(text).not.toContain('Cylinder gauge');
	});

	it('writes list rows with their units', () => {
		const def = calculators['cure-degree'];
		const values = defaultFormValues(def);
		const result = runCalculator('cure-degree', toRawInput(def, values));
		if (!result.ok) throw new Error(result.error);
		const text = resultText(def, values, result.outputs, result.warnings, '/x', CALCULATOR_CAUTION);
		expect(text).toContain('    - Start temperature 25 °C, End temperature 185 °C, Duration 3 s');
		expect(text).not.toContain('Cure curve');
	});
});
