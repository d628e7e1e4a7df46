import { describe, expect, it } from 'vitest';
import {
	CALCULATOR_CAUTION,
	calculatorIds,
	calculators,
	defaultInputs,
	isCalculatorId,
	listCalculators,
	runCalculator
} from './registry';

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

// The interface of CALCULATIONS.md: ids, input names and output names, copied from it
const interfaceNames = {
	'bond-force': {
		inputs: [
			'basis',
			'bumpCount',
			'bumpWidthUm',
			'bumpLengthUm',
			'widthMm',
			'lengthMm',
			'pressureMPa',
			'forceN',
			'cylinderBoreMm',
			'headWeightN'
		],
		outputs: [
			'areaMm2',
			'pressureMPa',
			'forceN',
			'forceKgf',
			'forcePerBumpMN',
			'cylinderGaugeMPa',
			'cylinderGaugeBar'
		]
	},
	'particle-capture': {
		inputs: [
			'densityPerMm2',
			'volumeFractionPct',
			'filmThicknessUm',
			'particleDiameterUm',
			'bumpWidthUm',
			'bumpLengthUm',
			'captureRatio',
			'minParticles',
			'bumpCount',
			'targetProbability'
		],
		// densityPerMm2 (the density used) is an addition of Padbridge's to the documented outputs
		outputs: [
			'densityPerMm2',
			'meanPerBump',
			'probBumpBelowMin',
			'probAnyBumpBelowMin',
			'requiredDensityPerMm2'
		]
	},
	'bridge-risk': {
		inputs: ['gapDensityPerMm2', 'particleDiameterUm', 'gapUm', 'overlapLengthUm', 'gapCount'],
		outputs: [
			'cellOccupancy',
			'cellsAcross',
			'rows',
			'probShortPerGap',
			'probAnyShort',
			'gapToDiameterRatio'
		]
	},
	'cure-degree': {
		inputs: [
			'model',
			'preExponentialPerS',
			'activationEnergyKJPerMol',
			'order',
			'k1PreExponentialPerS',
			'k1ActivationEnergyKJPerMol',
			'k2PreExponentialPerS',
			'k2ActivationEnergyKJPerMol',
			'm',
			'n',
			'segments',
			'targetDegree'
		],
		outputs: ['degreeOfCure', 'timeToTargetS', 'curve']
	},
	'pitch-compensation': {
		inputs: [
			'glassPitchMm',
			'padCount',
			'fpcCtePpmPerK',
			'fpcDeltaTK',
			'glassCtePpmPerK',
			'glassDeltaTK'
		],
		outputs: ['designPitchMm', 'preShrinkPct', 'preShrinkPer10k', 'spanErrorUm', 'edgeOffsetUm']
	},
	'head-offset': {
		inputs: ['points', 'targetC', 'tauS', 'startC', 'steadyC', 'reachC'],
		outputs: ['slope', 'interceptC', 'requiredSetpointC', 'rSquared', 'timeToReachS']
	},
	units: { inputs: ['quantity', 'value', 'from', 'to'], outputs: ['value'] }
} as const;

describe('registry', () => {
	it('lists the seven calculators of CALCULATIONS.md with their documented names', () => {
		expect([...calculatorIds].sort()).toEqual(Object.keys(interfaceNames).sort());
		for (const definition of listCalculators()) {
			const names = interfaceNames[definition.id];
			expect(definition.inputs.map((input) => input.name)).toEqual(names.inputs);
			expect(definition.outputs.map((output) => output.name)).toEqual(names.outputs);
			expect(definition.title.length).toBeGreaterThan(0);
			expect(definition.method.length).toBeGreaterThan(40);
			expect(definition.sources.length).toBeGreaterThan(0);
		}
	});

	it('presents the bridge model as a simplified teaching model', () => {
		expect(calculators['bridge-risk'].method).toMatch(/Padbridge's simplified teaching model/);
	});

	it('carries the planning-figure caution', () => {
		expect(CALCULATOR_CAUTION).toMatch(/planning figures/);
		expect(CALCULATOR_CAUTION).toMatch(/data sheet/);
		expect(CALCULATOR_CAUTION).toMatch(/manual/);
		expect(CALCULATOR_CAUTION).toMatch(/validated recipe/);
	});

	it('guards calculator ids', () => {
		expect(isCalculatorId('cure-degree')).toBe(true);
		expect(isCalculatorId('Cure-Degree')).toBe(false);
		expect(isCalculatorId('toString')).toBe(false);
		expect(isCalculatorId(3)).toBe(false);
	});

	it('describes every input with a label, help and a range that holds its default', () => {
		for (const definition of listCalculators()) {
			for (const input of definition.inputs) {
				expect(input.label, `${definition.id}.${input.name}`).not.toBe('');
				expect(input.help, `${definition.id}.${input.name}`).not.toBe('');
				if (input.kind === 'number' && input.default !== undefined) {
					if (input.min !== undefined) expect(input.default).toBeGreaterThanOrEqual(input.min);
					if (input.max !== undefined) expect(input.default).toBeLessThanOrEqual(input.max);
				}
				if (input.kind === 'select' && input.default !== undefined) {
					expect(input.options.map((option) => option.value)).toContain(input.default);
				}
			}
		}
	});

	it('runs every calculator on its defaults', () => {
		for (const id of calculatorIds) {
			const result = runCalculator(id, defaultInputs(id));
			expect(result.ok, id).toBe(true);
		}
	});
});

describe('runCalculator', () => {
	it('refuses unknown ids and input that is not an object', () => {
		const unknown = runCalculator('solder-volume', {});
		expect(unknown).toEqual({ ok: false, error: 'Unknown calculator "solder-volume"', fields: {} });
		for (const raw of [null, 42, 'pressureMPa=80', [1, 2]]) {
			const result = runCalculator('bond-force', raw);
			expect(result.ok).toBe(false);
		}
	});

	it('names the first problem in the error and lists every field', () => {
		const result = runCalculator('particle-capture', {
			densityPerMm2: 30000,
			bumpWidthUm: -20,
			bumpLengthUm: 100,
			captureRatio: 1.5,
			minParticles: 3,
			bumpCount: 100
		});
		expect(result.ok).toBe(false);
		if (result.ok) return;
		expect(result.fields).toEqual({
			bumpWidthUm: 'Bump width must be greater than 0 µm',
			captureRatio: 'Capture ratio must be between 0 and 1'
		});
		expect(result.error).toMatch(/^Invalid input: Bump width must be greater than 0 µm/);
	});

	it('turns a non-finite result into an error', () => {
		// Each bump dimension is above zero, but their product underflows to an area of 0 mm², so
		// the pressure would be Infinity
		const result = runCalculator('bond-force', {
			basis: 'bump',
			bumpCount: 1,
			bumpWidthUm: 1e-200,
			bumpLengthUm: 1e-200,
			forceN: 100
		});
		expect(result.ok).toBe(false);
		if (result.ok) return;
		expect(result.error).toMatch(/not a finite number/);
		expect(result.fields.pressureMPa).toMatch(/not a finite number/);
	});

	it('saturates at full cure for extreme kinetics instead of failing', () => {
		const result = runCalculator('cure-degree', {
			model: 'nth-order',
			preExponentialPerS: 1e30,
			activationEnergyKJPerMol: 0.001,
			order: 1,
			segments: [{ startC: 400, endC: 400, durationS: 86400 }]
		});
		expect(result.ok).toBe(true);
		if (!result.ok) return;
		expect(result.outputs.degreeOfCure).toBe(1);
		expect(result.outputs.timeToTargetS).toBeGreaterThan(0);
	});

	it('never returns NaN or Infinity for random input', () => {
		const random = mulberry32(99);
		const pick = <T>(values: readonly T[]): T => values[Math.floor(random() * values.length)];
		const values = [0, -1, 1e-300, 1e300, 1e308, '', ' ', '1e400', 'NaN', null, 3, 0.5, 2.5e8, 100];
		for (let trial = 0; trial < 3000; trial++) {
			const id = pick(calculatorIds);
			const input: Record<string, unknown> = defaultInputs(id);
			for (const definition of calculators[id].inputs) {
				if (definition.kind === 'number' && random() < 0.4) input[definition.name] = pick(values);
			}
			const result = runCalculator(id, input);
			if (!result.ok) {
				expect(typeof result.error).toBe('string');
				continue;
			}
			const numbers = JSON.stringify(result.outputs, (_key, value) => {
				if (typeof value === 'number' && !Number.isFinite(value)) return 'NON-FINITE';
				return value;
			});
			expect(numbers, `${id} ${JSON.stringify(input)}`).not.toContain('NON-FINITE');
		}
	});
});
