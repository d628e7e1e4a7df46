import { describe, expect, it } from 'vitest';
import {
	computePitchCompensation,
	pitchCompensationSchema,
	type PitchCompensationOutput
} from './pitch-compensation';
import { runCalculator } from './registry';

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

/** Linear thermal expansion L = L₀ (1 + α ΔT) (textbook physics), with α in ppm/K. */
function expanded(lengthMm: number, ctePpmPerK: number, deltaTK: number): number {
	return lengthMm * (1 + ctePpmPerK * 1e-6 * deltaTK);
}

function run(input: Record<string, unknown>): {
	outputs: PitchCompensationOutput;
	warnings: string[];
} {
	const result = runCalculator('pitch-compensation', input);
	if (!result.ok) throw new Error(`${result.error} ${JSON.stringify(result.fields)}`);
	return result;
}

// Polyimide 20 ppm/K and alkali-free glass 3.2 ppm/K: handbook presets of CALCULATIONS.md
const fogRow = {
	glassPitchMm: 0.05,
	padCount: 400,
	fpcCtePpmPerK: 20,
	fpcDeltaTK: 150,
	glassCtePpmPerK: 3.2,
	glassDeltaTK: 60
};

describe('pitch-compensation: against linear expansion', () => {
	it('lands the compensated FPC pitch on the glass pitch at bonding', () => {
		const { outputs } = run(fogRow);
		const fpcAtBondMm = expanded(outputs.designPitchMm, 20, 150);
		const glassAtBondMm = expanded(0.05, 3.2, 60);
		expect(relativeError(fpcAtBondMm, glassAtBondMm)).toBeLessThan(1e-14);
	});

	it('gives the span error of an uncompensated row, pad by pad', () => {
		const { outputs } = run(fogRow);
		// Lay out the row at bonding temperature: each pad of an FPC drawn at the glass pitch
		// against its glass pad, with the offset read in the glass's room-temperature frame
		// (the frame of CALCULATIONS.md's formula).
		let lastOffsetMm = 0;
		for (let pad = 0; pad < fogRow.padCount; pad++) {
			const fpcMm = expanded(pad * 0.05, 20, 150);
			const glassMm = expanded(pad * 0.05, 3.2, 60);
			lastOffsetMm = (fpcMm - glassMm) / (1 + 3.2e-6 * 60);
		}
		expect(relativeError(outputs.spanErrorUm, lastOffsetMm * 1000)).toBeLessThan(1e-12);
		expect(outputs.edgeOffsetUm).toBe(outputs.spanErrorUm / 2);
	});

	it('matches a hand calculation', () => {
		// f = 20e-6 × 150 = 0.003, g = 3.2e-6 × 60 = 0.000192 (by hand, CALCULATIONS.md formulas):
		// s = 1 − 1.000192 / 1.003 = 0.002808 / 1.003 = 0.00279960 → 0.279960 %, 27.9960 per 10 000;
		// span = 399 × 0.05 mm × 0.002808 / 1.000192 = 0.0560088 mm = 56.0088 µm
		const { outputs } = run(fogRow);
		expect(outputs.preShrinkPct).toBeCloseTo(0.27996012, 7);
		expect(outputs.preShrinkPer10k).toBeCloseTo(27.996012, 5);
		expect(outputs.designPitchMm).toBeCloseTo(0.04986002, 8);
		expect(outputs.spanErrorUm).toBeCloseTo(56.00885, 4);
	});

	it('needs no compensation when both sides grow alike', () => {
		// Equal strain: 10 ppm/K × 100 K on the FPC and 20 ppm/K × 50 K on the glass (by hand)
		const { outputs, warnings } = run({
			...fogRow,
			fpcCtePpmPerK: 10,
			fpcDeltaTK: 100,
			glassCtePpmPerK: 20,
			glassDeltaTK: 50
		});
		expect(outputs.designPitchMm).toBe(0.05);
		expect(outputs.preShrinkPct).toBe(0);
		expect(outputs.spanErrorUm).toBe(0);
		expect(warnings).toEqual([]);
	});

	it('holds the expansion identity for random materials', () => {
		const random = mulberry32(17);
		for (let trial = 0; trial < 200; trial++) {
			const input = {
				glassPitchMm: 0.02 + random() * 0.5,
				padCount: 2 + Math.floor(random() * 2000),
				fpcCtePpmPerK: random() * 40,
				fpcDeltaTK: random() * 250,
				glassCtePpmPerK: random() * 12,
				glassDeltaTK: random() * 150
			};
			const { outputs } = computePitchCompensation(pitchCompensationSchema.parse(input));
			const fpcAtBond = expanded(outputs.designPitchMm, input.fpcCtePpmPerK, input.fpcDeltaTK);
			const glassAtBond = expanded(input.glassPitchMm, input.glassCtePpmPerK, input.glassDeltaTK);
			expect(relativeError(fpcAtBond, glassAtBond)).toBeLessThan(1e-14);
			expect(relativeError(outputs.preShrinkPer10k, outputs.preShrinkPct * 100)).toBeLessThan(
				1e-14
			);
			// Pre-shrink by its definition s = 1 − P_f0 / P_g0; at these sizes no digits are lost
			expect(outputs.preShrinkPct / 100).toBeCloseTo(
				1 - outputs.designPitchMm / input.glassPitchMm,
				12
			);
		}
	});
});

describe('pitch-compensation: warnings and validation', () => {
	it('warns when the glass grows more than the FPC, and when edges miss by half a pitch', () => {
		const stretch = run({ ...fogRow, fpcCtePpmPerK: 3, glassCtePpmPerK: 9, glassDeltaTK: 100 });
		expect(stretch.outputs.preShrinkPct).toBeLessThan(0);
		expect(stretch.warnings.join(' ')).toMatch(/stretched/);
		// 56 µm span error over a 50 µm pitch: 28 µm at each edge is more than half a pitch
		expect(run(fogRow).warnings.join(' ')).toMatch(/half a pitch/);
	});

	it('gives a field error for each bad input', () => {
		const result = runCalculator('pitch-compensation', {
			glassPitchMm: 0,
			padCount: 1,
			fpcCtePpmPerK: '',
			fpcDeltaTK: 'hot',
			glassCtePpmPerK: 3.2
		});
		expect(result.ok).toBe(false);
		if (result.ok) return;
		expect(result.fields.glassPitchMm).toMatch(/greater than 0 mm/);
		expect(result.fields.padCount).toMatch(/between 2 and/);
		expect(result.fields.fpcCtePpmPerK).toMatch(/empty/);
		expect(result.fields.fpcDeltaTK).toMatch(/must be a number/);
		expect(result.fields.glassDeltaTK).toMatch(/required/);
	});
});
