import { describe, expect, it } from 'vitest';
import { calcBlockBody, calcBlockFromQuery, parseCalcPresets } from './presets';
import { calculators } from './registry';
import { defaultFormValues, formValuesFromPresets, toQuery, type ListRow } from './form-values';

describe('parseCalcPresets', () => {
	it('reads key: value lines', () => {
		expect(parseCalcPresets('basis: bump\nbumpCount: 1200\npressureMPa: 78.4532\n')).toEqual({
			basis: 'bump',
			bumpCount: '1200',
			pressureMPa: '78.4532'
		});
	});

	it('trims, skips blank and # lines, and accepts CRLF', () => {
		expect(parseCalcPresets('  # COG main bond\r\n\r\n  bumpWidthUm :  20  \r\n')).toEqual({
			bumpWidthUm: '20'
		});
	});

	it('keeps colons inside the value, so a JSON list survives', () => {
		const presets = parseCalcPresets('segments: [{"startC": 25, "endC": 185, "durationS": 3}]');
		expect(JSON.parse(presets.segments)).toEqual([{ startC: 25, endC: 185, durationS: 3 }]);
	});

	it('accepts dotted list keys and keeps the last of repeated keys', () => {
		expect(
			parseCalcPresets(
				'points.0.setpointC: 200\npoints.0.measuredC: 167\ntargetC: 180\ntargetC: 185'
			)
		).toEqual({ 'points.0.setpointC': '200', 'points.0.measuredC': '167', targetC: '185' });
	});

	it('unquotes quoted values and allows an empty value', () => {
		expect(parseCalcPresets('from: "kgf/cm²"\nforceN:')).toEqual({ from: 'kgf/cm²', forceN: '' });
	});

	it('leaves out lines that are not key: value', () => {
		expect(
			parseCalcPresets('just text\n: no key\nbad key: 1\n__proto__: x\n9lives: 1\nvalue: 800')
		).toEqual({ value: '800' });
	});

	it('does not let a key reach the object prototype', () => {
		const presets = parseCalcPresets('constructor: 1\ntoString: 2');
		expect(Object.keys(presets)).toEqual(['constructor', 'toString']);
		expect(Object.getPrototypeOf(presets)).toBe(Object.prototype);
	});
});

describe('calcBlockFromQuery', () => {
	it('writes a fenced block whose lines read back to the same inputs', () => {
		const def = calculators['cure-degree'];
		const values = defaultFormValues(def);
		values.targetDegree = '0.85';
		(values.segments as ListRow[])[1].durationS = '20';
		const block = calcBlockFromQuery(def.id, toQuery(def, values));
		expect(block.split('\n')[0]).toBe('```calc cure-degree');
		expect(block.endsWith('\n```')).toBe(true);
		expect(block).toContain('targetDegree: 0.85');
		expect(block).toContain('segments.1.durationS: 20');
		const back = formValuesFromPresets(def, parseCalcPresets(calcBlockBody(block)));
		expect(back.ignored).toEqual([]);
		expect(back.values).toEqual(values);
	});

	it('leaves out the row buttons of the form and is empty for the defaults', () => {
		const block = calcBlockFromQuery('units', new URLSearchParams('_add=segments'));
		expect(block).toBe('```calc units\n```');
		expect(parseCalcPresets(calcBlockBody(block))).toEqual({});
	});
});
