import { describe, expect, it } from 'vitest';
import { describePreset, parseCalcPresets } from './calc-presets';

describe('parseCalcPresets', () => {
	it('reads input: value lines, skipping blanks and # comments', () => {
		const r = parseCalcPresets(
			'units',
			'# data sheet value\nquantity: pressure\n\n  value :  800  \nfrom: kgf/cm²\nto: MPa\n'
		);
		expect(r).toEqual({
			presets: { quantity: 'pressure', value: '800', from: 'kgf/cm²', to: 'MPa' },
			warnings: []
		});
	});

	it('keeps colons after the first one in the value (JSON lists)', () => {
		const points = '[{"setpointC":200,"measuredC":167.5},{"setpointC":220,"measuredC":183.8}]';
		const r = parseCalcPresets('head-offset', `points: ${points}\ntargetC: 180`);
		expect(r.presets.points).toBe(points);
		expect(r.warnings).toEqual([]);
	});

	it('names the document line of each problem', () => {
		const r = parseCalcPresets(
			'bond-force',
			'basis: bump\nbump count 1200\nBumpCount: 1200\npressureMPa:\npressureMPa: -3\nbasis: tool',
			10
		);
		expect(r.warnings).toEqual([
			'Line 11 (calc bond-force): write "input: value" (got "bump count 1200")',
			'Line 12 (calc bond-force): unknown input "BumpCount"; did you mean "bumpCount"?',
			'Line 13 (calc bond-force): "pressureMPa" has no value',
			'Line 14 (calc bond-force): Pressure must be greater than 0 MPa',
			'Line 15 (calc bond-force): "basis" is set twice; the first value is used'
		]);
		expect(r.presets).toEqual({ basis: 'bump', pressureMPa: '-3' });
	});

	it('checks values with the calculator’s own field rules', () => {
		const r = parseCalcPresets(
			'particle-capture',
			'minParticles: 2.5\ncaptureRatio: 1.5\nbumpCount: 0x10\ndensityPerMm2: 3e4'
		);
		expect(r.warnings).toEqual([
			'Line 1 (calc particle-capture): Minimum particles per bump must be a whole number',
			'Line 2 (calc particle-capture): Capture ratio must be between 0 and 1',
			'Line 3 (calc particle-capture): Bump count must be a number'
		]);
	});

	it('checks selects and lists', () => {
		const r = parseCalcPresets(
			'cure-degree',
			'model: arrhenius\nsegments: [{"startC":25}]\ntargetDegree: 0.9'
		);
		expect(r.warnings).toHaveLength(2);
		expect(r.warnings[0]).toMatch(
			/^Line 1 \(calc cure-degree\): Kinetic model must be one of: nth-order, kamal/
		);
		expect(r.warnings[1]).toMatch(/^Line 2 \(calc cure-degree\): /);
	});

	it('warns about an input the chosen setting does not use', () => {
		const onDefault = parseCalcPresets('bond-force', 'widthMm: 1.5');
		expect(onDefault.warnings).toEqual([
			'Line 1 (calc bond-force): "widthMm" is only used when basis is tool or acf or lead'
		]);
		const onTool = parseCalcPresets('bond-force', 'basis: tool\nwidthMm: 1.5');
		expect(onTool.warnings).toEqual([]);
	});

	it('refuses a value longer than any input needs', () => {
		const r = parseCalcPresets('units', `value: ${'9'.repeat(5000)}`);
		expect(r.presets).toEqual({});
		expect(r.warnings).toEqual(['Line 1 (calc units): the value of "value" is too long']);
	});
});

describe('describePreset', () => {
	it('adds units, option labels and list items', () => {
		expect(describePreset('bond-force', 'bumpWidthUm', '18')).toBe('18 µm');
		expect(describePreset('bond-force', 'basis', 'bump')).toBe('Total bump area (COG, COF)');
		expect(describePreset('units', 'value', '800')).toBe('800');
		expect(
			describePreset(
				'head-offset',
				'points',
				'[{"setpointC":200,"measuredC":167.5},{"setpointC":220,"measuredC":183.8}]'
			)
		).toBe('200 °C / 167.5 °C; 220 °C / 183.8 °C');
		expect(describePreset('head-offset', 'points', 'not json')).toBe('not json');
	});
});
