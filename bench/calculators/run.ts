/**
 * Calculator benchmark: evaluations per second of each calculator in-process (validation and
 * computation, as the API and the pages run them), and the cure integrator's time for a 30 s
 * profile at 1e-6 accuracy. Exits non-zero when the cure goal is missed.
 *
 *   npx tsx bench/calculators/run.ts
 */
import {
	calculatorIds,
	defaultInputs,
	runCalculator,
	type CalculatorId
} from '../../src/lib/calculators/registry';
import {
	arrheniusPerS,
	integrateCure,
	type CureKinetics,
	type CureSegment
} from '../../src/lib/calculators/cure-degree';

const EVALS_FLOOR_PER_S = 10_000;
// A 2 ms profile is 500 profiles a second, so that is the cure calculator's floor.
const CURE_EVALS_FLOOR_PER_S = 500;
const CURE_GOAL_MS = 2;
const CURE_ACCURACY = 1e-6;
const BATCHES = 10;

function median(values: number[]): number {
	const sorted = [...values].sort((a, b) => a - b);
	const middle = Math.floor(sorted.length / 2);
	return sorted.length % 2 ? sorted[middle] : (sorted[middle - 1] + sorted[middle]) / 2;
}

/** Median over batches of the time per call, in milliseconds, after a warm-up. */
function timePerCallMs(call: () => unknown, runsPerBatch: number): number {
	for (let j = 0; j < runsPerBatch; j++) call();
	const perCall: number[] = [];
	for (let batch = 0; batch < BATCHES; batch++) {
		const start = performance.now();
		for (let j = 0; j < runsPerBatch; j++) call();
		perCall.push((performance.now() - start) / runsPerBatch);
	}
	return median(perCall);
}

function table(header: string[], rows: string[][]): string {
	const widths = header.map((title, column) =>
		Math.max(title.length, ...rows.map((row) => row[column].length))
	);
	const line = (cells: string[]) =>
		'| ' + cells.map((cell, column) => cell.padEnd(widths[column])).join(' | ') + ' |';
	const rule = '|' + widths.map((width) => '-'.repeat(width + 2)).join('|') + '|';
	return [line(header), rule, ...rows.map(line)].join('\n');
}

const format = (value: number, digits = 0) =>
	value.toLocaleString('en-US', { maximumFractionDigits: digits, minimumFractionDigits: digits });

// 1 Evaluations per second of every calculator on its default inputs.
const evalRows: string[][] = [];
for (const id of calculatorIds) {
	const input = defaultInputs(id as CalculatorId);
	const check = runCalculator(id, input);
	if (!check.ok) throw new Error(`${id} fails on its defaults: ${check.error}`);
	const runs = id === 'cure-degree' ? 500 : 5000;
	const ms = timePerCallMs(() => runCalculator(id, input), runs);
	const perSecond = 1000 / ms;
	const floor = id === 'cure-degree' ? CURE_EVALS_FLOOR_PER_S : EVALS_FLOOR_PER_S;
	evalRows.push([
		id,
		String(runs * BATCHES),
		format(perSecond),
		`≥ ${format(floor)} /s`,
		perSecond >= floor ? 'ok' : 'below floor'
	]);
}

// 2 The cure integrator over a 30 s bond profile: ramp, hold, cool.
const profile: CureSegment[] = [
	{ startC: 25, endC: 190, durationS: 5 },
	{ startC: 190, endC: 190, durationS: 20 },
	{ startC: 190, endC: 120, durationS: 5 }
];
const nthOrder: CureKinetics = { model: 'nth-order', a: 2.5e8, eaJPerMol: 80000, n: 1 };
const kamal: CureKinetics = {
	model: 'kamal',
	a1: 1e7,
	ea1JPerMol: 75000,
	a2: 1.2e7,
	ea2JPerMol: 65000,
	m: 0.5,
	n: 1.5
};

/** α = 1 − exp(−∫k dt) for n = 1, the integral by a composite Simpson rule per segment. */
function firstOrderReference(kinetics: Extract<CureKinetics, { model: 'nth-order' }>): number {
	const intervals = 200_000;
	let theta = 0;
	for (const segment of profile) {
		const h = segment.durationS / intervals;
		const k = (t: number) =>
			arrheniusPerS(
				kinetics.a,
				kinetics.eaJPerMol,
				segment.startC + ((segment.endC - segment.startC) * t) / segment.durationS
			);
		let sum = k(0) + k(segment.durationS);
		for (let j = 1; j < intervals; j++) sum += (j % 2 ? 4 : 2) * k(j * h);
		theta += (sum * h) / 3;
	}
	return -Math.expm1(-theta);
}

const cureRows: string[][] = [];
let cureGoalMissed = false;
for (const [label, kinetics] of [
	['n-th order (n = 1)', nthOrder],
	['Kamal–Sourour (m = 0.5, n = 1.5)', kamal]
] as const) {
	const result = integrateCure(kinetics, profile, { targetDegree: 0.9 });
	const ms = timePerCallMs(() => integrateCure(kinetics, profile, { targetDegree: 0.9 }), 200);
	let accuracy = 'no closed form';
	let accurate = true;
	if (kinetics.model === 'nth-order') {
		const error = Math.abs(result.degreeOfCure - firstOrderReference(kinetics));
		accurate = error <= CURE_ACCURACY;
		accuracy = `Δα ${error.toExponential(1)}`;
	}
	const met = ms < CURE_GOAL_MS && accurate;
	if (!met) cureGoalMissed = true;
	cureRows.push([
		label,
		String(result.steps),
		format(ms, 3),
		accuracy,
		`< ${CURE_GOAL_MS} ms, Δα ≤ ${CURE_ACCURACY.toExponential(0)}`,
		met ? 'ok' : 'MISSED'
	]);
}

console.log('Calculator evaluations per second (validation + computation, default inputs)\n');
console.log(table(['calculator', 'runs', 'evals/s', 'floor/goal', 'status'], evalRows));
console.log('\nCure integrator, 30 s profile (25→190 °C in 5 s, 20 s hold, 190→120 °C in 5 s)\n');
console.log(
	table(['kinetics', 'steps', 'ms/profile', 'accuracy', 'floor/goal', 'status'], cureRows)
);
if (cureGoalMissed) {
	console.error('\nThe cure integrator missed its goal.');
	process.exit(1);
}
