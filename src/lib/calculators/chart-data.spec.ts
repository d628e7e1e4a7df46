import { describe, expect, it } from 'vitest';
import jStat from 'jstat';
import { linearScale, niceTicks, padOffsets, poissonBars } from './chart-data';
import { computePitchCompensation } from './pitch-compensation';

describe('niceTicks', () => {
	it('covers the range with steps of 1, 2 or 5 × 10ⁿ', () => {
		expect(niceTicks(0, 1, 5)).toEqual([0, 0.2, 0.4, 0.6, 0.8, 1]);
		expect(niceTicks(25, 185, 4)).toEqual([0, 50, 100, 150, 200]);
		expect(niceTicks(-28.1, 28.1, 4)).toEqual([-40, -20, 0, 20, 40]);
		expect(niceTicks(0, 0.0012, 3)).toEqual([0, 0.0005, 0.001, 0.0015]);
	});

	it('widens an empty range instead of dividing by zero', () => {
		const ticks = niceTicks(185, 185, 4);
		expect(ticks[0]).toBeLessThan(185);
		expect(ticks.at(-1)).toBeGreaterThan(185);
		expect(niceTicks(Number.NaN, 1)).toEqual([]);
	});

	it('always reaches both ends', () => {
		for (const [low, high] of [
			[0.3, 7.9],
			[1, 999],
			[-5, 3e6],
			[0, 15]
		]) {
			const ticks = niceTicks(low, high, 5);
			expect(ticks[0]).toBeLessThanOrEqual(low);
			expect(ticks.at(-1)).toBeGreaterThanOrEqual(high);
		}
	});
});

describe('linearScale', () => {
	it('maps the domain ends onto the range ends, reversed ranges included', () => {
		const y = linearScale([0, 1], [300, 20]);
		expect(y(0)).toBe(300);
		expect(y(1)).toBe(20);
		expect(y(0.5)).toBe(160);
	});
});

describe('poissonBars', () => {
	it('gives P(N = k) as a statistics library does, and marks the bars below k_min', () => {
		const { bars, minShown } = poissonBars(5, 3);
		expect(minShown).toBe(true);
		for (const bar of bars) {
			// jstat's Poisson pmf is the reference
			expect(bar.probability).toBeCloseTo(jStat.poisson.pdf(bar.k, 5), 12);
			expect(bar.belowMin).toBe(bar.k < 3);
		}
		expect(bars[0].k).toBe(0);
	});

	it('takes in k_min when it lies a little left of the likely counts', () => {
		const { bars, minShown } = poissonBars(18, 3);
		expect(minShown).toBe(true);
		expect(bars[0].k).toBeLessThanOrEqual(2);
		expect(bars.length).toBeLessThanOrEqual(60);
	});

	it('keeps the chart readable when k_min is far away', () => {
		const { bars, minShown } = poissonBars(2000, 3);
		expect(minShown).toBe(false);
		expect(bars.length).toBe(60);
		expect(bars.some((bar) => bar.k === 2000)).toBe(true);
	});
});

describe('padOffsets', () => {
	it('run from minus half the span error to plus half of it, zero at the centre', () => {
		const result = computePitchCompensation({
			glassPitchMm: 0.05,
			padCount: 5,
			fpcCtePpmPerK: 20,
			fpcDeltaTK: 150,
			glassCtePpmPerK: 3.2,
			glassDeltaTK: 60
		});
		const offsets = padOffsets(5, result.outputs.spanErrorUm);
		expect(offsets.map((o) => o.pad)).toEqual([1, 2, 3, 4, 5]);
		expect(offsets[0].offsetUm).toBeCloseTo(-result.outputs.edgeOffsetUm, 12);
		expect(offsets[2].offsetUm).toBe(0);
		expect(offsets[4].offsetUm).toBeCloseTo(result.outputs.edgeOffsetUm, 12);
		// Linear expansion evaluated independently: 4 pitches × 50 µm × (1.003/1.000192 − 1)
		expect(offsets[4].offsetUm - offsets[0].offsetUm).toBeCloseTo(
			4 * 50 * (1.003 / 1.000192 - 1),
			9
		);
	});

	it('samples long rows evenly and keeps the end pads', () => {
		const offsets = padOffsets(400, 56);
		expect(offsets.length).toBe(81);
		expect(offsets[0]).toEqual({ pad: 1, offsetUm: -28 });
		expect(offsets.at(-1)).toEqual({ pad: 400, offsetUm: 28 });
		expect(padOffsets(1, 10)).toEqual([]);
	});
});
