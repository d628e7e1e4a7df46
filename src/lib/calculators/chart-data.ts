// Data and axis arithmetic for the calculator charts, kept out of the components so it is tested.
import { poissonPmf } from './particle-capture';

/** Round tick values ("nice numbers": steps of 1, 2 or 5 × 10ⁿ) covering [min, max]. */
export function niceTicks(min: number, max: number, count = 5): number[] {
	if (!Number.isFinite(min) || !Number.isFinite(max)) return [];
	if (min === max) {
		const pad = min === 0 ? 1 : Math.abs(min) * 0.1;
		return niceTicks(min - pad, max + pad, count);
	}
	const low = Math.min(min, max);
	const high = Math.max(min, max);
	const rough = (high - low) / Math.max(1, count);
	const power = 10 ** Math.floor(Math.log10(rough));
	const step = [1, 2, 5, 10].map((m) => m * power).find((s) => s >= rough) ?? 10 * power;
	const first = Math.floor(low / step) * step;
	const ticks: number[] = [];
	for (let tick = first; tick <= high + step * 0.5 && ticks.length < 50; tick += step) {
		// Multiplying out again avoids the drift of repeated addition (0.1 + 0.2 …).
		ticks.push(Number((Math.round(tick / step) * step).toPrecision(12)));
	}
	if (ticks.at(-1)! < high) ticks.push(Number((ticks.at(-1)! + step).toPrecision(12)));
	return ticks;
}

/** A linear map from a data range onto a pixel range. */
export function linearScale(domain: readonly [number, number], range: readonly [number, number]) {
	const [d0, d1] = domain;
	const [r0, r1] = range;
	const span = d1 - d0 || 1;
	return (value: number) => r0 + ((value - d0) / span) * (r1 - r0);
}

export interface PoissonBar {
	k: number;
	probability: number;
	belowMin: boolean;
}

export interface PoissonBars {
	bars: PoissonBar[];
	/** False when k_min lies so far left of the likely counts that it is off the chart. */
	minShown: boolean;
}

const MAX_BARS = 60;

/** Bars of P(N = k) around the mean, widened to include k_min when that keeps the chart readable. */
export function poissonBars(lambda: number, kMin: number): PoissonBars {
	const spread = 4 * Math.sqrt(lambda) + 2;
	let low = Math.max(0, Math.floor(lambda - spread));
	let high = Math.max(kMin + 1, Math.ceil(lambda + spread));
	if (kMin - 1 < low && high - (kMin - 1) <= MAX_BARS) low = Math.max(0, kMin - 1);
	if (high - low + 1 > MAX_BARS) {
		const centre = Math.round(lambda);
		low = Math.max(0, centre - Math.floor(MAX_BARS / 2));
		high = low + MAX_BARS - 1;
	}
	const pmf = poissonPmf(lambda, high);
	const bars: PoissonBar[] = [];
	for (let k = low; k <= high; k++) bars.push({ k, probability: pmf[k], belowMin: k < kMin });
	return { bars, minShown: kMin >= low && kMin <= high + 1 };
}

export interface PadOffset {
	/** Pad number along the row, 1 to N. */
	pad: number;
	offsetUm: number;
}

const MAX_PAD_POINTS = 81;

/**
 * Where each pad would land without pre-shrink, aligned at the centre of the row: the span error
 * grows linearly from the centre, half of it at each end. Long rows are sampled evenly, ends kept.
 */
export function padOffsets(padCount: number, spanErrorUm: number): PadOffset[] {
	if (padCount < 2) return [];
	const perPitchUm = spanErrorUm / (padCount - 1);
	const centre = (padCount + 1) / 2;
	const count = Math.min(padCount, MAX_PAD_POINTS);
	const pads = new Set<number>();
	for (let j = 0; j < count; j++) {
		pads.add(Math.round(1 + ((padCount - 1) * j) / (count - 1)));
	}
	return [...pads].map((pad) => ({ pad, offsetUm: (pad - centre) * perPitchUm }));
}
