import { describe, expect, it } from 'vitest';
import { calculators, runCalculator } from './registry';
import {
	addListRow,
	applyEntries,
	defaultFormValues,
	formValuesFromPresets,
	formValuesFromQuery,
	removeListRow,
	shareHref,
	shownInputs,
	toQuery,
	toRawInput,
	type ListRow
} from './form-values';
import { parseCalcPresets } from './presets';

const bond = calculators['bond-force'];
const cure = calculators['cure-degree'];

describe('form values', () => {
	it('start from the defaults as text, empty where there is none', () => {
		const values = defaultFormValues(bond);
		expect(values.basis).toBe('bump');
		expect(values.bumpCount).toBe('1200');
		expect(values.forceN).toBe('');
		expect(defaultFormValues(cure).segments).toEqual([
			{ startC: '25', endC: '185', durationS: '3' },
			{ startC: '185', endC: '185', durationS: '12' }
		]);
	});

	it('show only the inputs of the chosen basis and send only those', () => {
		const values = { ...defaultFormValues(bond), basis: 'tool' };
		const names = shownInputs(bond, values).map((input) => input.name);
		expect(names).toContain('widthMm');
		expect(names).not.toContain('bumpCount');
		expect(Object.keys(toRawInput(bond, values))).not.toContain('bumpWidthUm');
	});

	it('give the same result as the registry on the defaults', () => {
		const direct = runCalculator('bond-force', {
			basis: 'bump',
			bumpCount: 1200,
			bumpWidthUm: 20,
			bumpLengthUm: 100,
			pressureMPa: 80,
			headWeightN: 0
		});
		const viaForm = runCalculator('bond-force', toRawInput(bond, defaultFormValues(bond)));
		expect(viaForm).toEqual(direct);
		// 1200 × 20 µm × 100 µm = 2.4 mm²; 80 MPa × 2.4 mm² = 192 N (arithmetic, common practice)
		expect(direct.ok && direct.outputs.forceN).toBeCloseTo(192, 10);
	});
});

describe('query and share links', () => {
	it('carry only what differs from the defaults', () => {
		const values = { ...defaultFormValues(bond), pressureMPa: '78.4532' };
		expect(toQuery(bond, values).toString()).toBe('pressureMPa=78.4532');
		expect(shareHref(bond, defaultFormValues(bond))).toBe('/calculators/bond-force');
	});

	it('round-trip every kind of input, including an emptied field and changed list rows', () => {
		const values = defaultFormValues(cure);
		values.model = 'kamal';
		values.targetDegree = '';
		(values.segments as ListRow[])[1].durationS = '20';
		values.segments = addListRow(
			cure.inputs.find((i) => i.name === 'segments') as never,
			values.segments as ListRow[]
		);
		const params = new URLSearchParams(toQuery(cure, values).toString());
		expect(params.get('targetDegree')).toBe('');
		expect(params.get('segments.2.durationS')).toBe('20');
		const back = formValuesFromQuery(cure, params);
		expect(back.model).toBe('kamal');
		expect(back.targetDegree).toBe('');
		expect(back.segments).toEqual(values.segments);
	});

	it('can carry an empty list, which the calculator then refuses with a field error', () => {
		const values = { ...defaultFormValues(cure), segments: [] };
		const params = toQuery(cure, values);
		expect(params.toString()).toBe('segments=');
		const back = formValuesFromQuery(cure, params);
		expect(back.segments).toEqual([]);
		const result = runCalculator('cure-degree', toRawInput(cure, back));
		expect(result.ok).toBe(false);
		if (!result.ok) expect(result.fields.segments).toMatch(/at least one segment/);
	});

	it('keeps what was typed, even when it is not a number', () => {
		const back = formValuesFromQuery(bond, new URLSearchParams('bumpWidthUm=abc'));
		expect(back.bumpWidthUm).toBe('abc');
		const result = runCalculator('bond-force', toRawInput(bond, back));
		expect(!result.ok && result.fields.bumpWidthUm).toBe('Bump width must be a number');
		const emptied = formValuesFromQuery(bond, new URLSearchParams('pressureMPa='));
		expect(emptied.pressureMPa).toBe('');
		const second = runCalculator('bond-force', toRawInput(bond, emptied));
		expect(!second.ok && second.fields.pressureMPa).toBe('Enter a pressure or a force');
	});

	it('orders list rows by index, closes gaps and ignores unknown keys', () => {
		const { values, ignored } = applyEntries(
			calculators['head-offset'],
			defaultFormValues(calculators['head-offset']),
			new URLSearchParams(
				'points.5.setpointC=240&points.5.measuredC=200&points.1.setpointC=200&points.1.measuredC=168&points.1.colour=red&bogus=1'
			)
		);
		expect(values.points).toEqual([
			{ setpointC: '200', measuredC: '168' },
			{ setpointC: '240', measuredC: '200' }
		]);
		expect(ignored).toEqual(['points.1.colour', 'bogus']);
	});

	it('keeps one row past the limit, so the calculator can report the list as too long', () => {
		const params = new URLSearchParams();
		for (let j = 0; j < 80; j++) params.set(`segments.${j}.durationS`, '1');
		const values = formValuesFromQuery(cure, params);
		expect((values.segments as ListRow[]).length).toBe(51);
		const result = runCalculator('cure-degree', toRawInput(cure, values));
		expect(!result.ok && result.fields.segments).toMatch(/at most 50/);
	});

	it('applies the add and remove row buttons of the form without JavaScript', () => {
		const added = formValuesFromQuery(cure, new URLSearchParams('_add=segments'));
		expect((added.segments as ListRow[]).length).toBe(3);
		expect((added.segments as ListRow[])[2]).toEqual({
			startC: '185',
			endC: '185',
			durationS: '12'
		});
		const removed = formValuesFromQuery(cure, new URLSearchParams('_remove=segments.0'));
		expect(removed.segments).toEqual([{ startC: '185', endC: '185', durationS: '12' }]);
	});

	it('cuts absurdly long values', () => {
		const values = formValuesFromQuery(bond, new URLSearchParams({ bumpCount: '9'.repeat(5000) }));
		expect((values.bumpCount as string).length).toBe(400);
	});
});

describe('presets of an embedded block', () => {
	it('fill the inputs and report keys the calculator does not know', () => {
		const presets = parseCalcPresets(
			'basis: tool\nwidthMm: 1.2\nlengthMm: 25\npressureMPa: 3\ncolour: red'
		);
		const { values, ignored } = formValuesFromPresets(bond, presets);
		expect(values).toMatchObject({
			basis: 'tool',
			widthMm: '1.2',
			lengthMm: '25',
			pressureMPa: '3'
		});
		expect(ignored).toEqual(['colour']);
		const result = runCalculator('bond-force', toRawInput(bond, values));
		// 1.2 mm × 25 mm × 3 MPa = 90 N (arithmetic)
		expect(result.ok && result.outputs.forceN).toBeCloseTo(90, 10);
	});

	it('accept a list as JSON and refuse a list that is not one', () => {
		const { values } = formValuesFromPresets(cure, {
			segments:
				'[{"startC": 25, "endC": 190, "durationS": 5}, {"startC": 190, "endC": 190, "durationS": 10}]'
		});
		expect(values.segments).toEqual([
			{ startC: '25', endC: '190', durationS: '5' },
			{ startC: '190', endC: '190', durationS: '10' }
		]);
		const bad = formValuesFromPresets(cure, { segments: '{"startC": 25}' });
		expect(bad.ignored).toEqual(['segments']);
		expect(bad.values.segments).toEqual(defaultFormValues(cure).segments);
	});

	it('removes a row by index without touching the others', () => {
		const rows = [{ a: '1' }, { a: '2' }, { a: '3' }];
		expect(removeListRow(rows, 1)).toEqual([{ a: '1' }, { a: '3' }]);
		expect(rows).toHaveLength(3);
	});
});
