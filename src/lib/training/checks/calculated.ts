// Calculated questions: parameters drawn per attempt from ranges, the prompt filled in with them,
// and the answer key computed by the same calculator code the calculator pages run.
import {
	calculators,
	isCalculatorId,
	runCalculator,
	type CalculatorId,
	type NumberInputDef
} from '../../calculators/registry';

export interface RangeParam {
	min: number;
	max: number;
	step: number;
}
export interface FixedParam {
	value: number | string;
}
export type ParamSpec = RangeParam | FixedParam;

export interface CalcSpec {
	calculatorId: string;
	output: string;
	unit: string;
	tolerancePct: number;
	params: Record<string, ParamSpec>;
}

export const isRange = (p: ParamSpec): p is RangeParam => 'min' in p;

/** Decimal places of a number as written (0.05 → 2), so drawn values carry no binary noise. */
function decimals(n: number): number {
	const s = String(n);
	if (s.includes('e-')) return Number(s.split('e-')[1]);
	return s.includes('.') ? s.split('.')[1].length : 0;
}

/** How many values a range offers: min, min + step, …, up to max. */
export function rangeCount(p: RangeParam): number {
	return Math.floor((p.max - p.min) / p.step + 1e-9) + 1;
}

/** The k-th value of a range, rounded to the precision of min and step. */
export function rangeValue(p: RangeParam, k: number): number {
	const places = Math.max(decimals(p.min), decimals(p.step));
	return Number((p.min + k * p.step).toFixed(places));
}

/** Draws one value per range (fixed values are kept) with `randomInt(n)` giving 0 … n − 1. */
export function drawParams(
	spec: CalcSpec,
	randomInt: (n: number) => number
): Record<string, number | string> {
	const out: Record<string, number | string> = {};
	for (const [name, p] of Object.entries(spec.params)) {
		out[name] = isRange(p) ? rangeValue(p, randomInt(rangeCount(p))) : p.value;
	}
	return out;
}

const PLACEHOLDER = /\{([A-Za-z][A-Za-z0-9]*)\}/g;

/** Placeholder names used in a prompt template. */
export function placeholders(template: string): string[] {
	return [...template.matchAll(PLACEHOLDER)].map((m) => m[1]);
}

/** "1150" → "1,150"; decimals as drawn. */
export function formatParam(value: number | string): string {
	if (typeof value === 'string') return value;
	return new Intl.NumberFormat('en-US', { maximumFractionDigits: 10 }).format(value);
}

/** The prompt with every {param} replaced by its drawn value. */
export function renderPrompt(template: string, params: Record<string, number | string>): string {
	return template.replace(PLACEHOLDER, (whole, name: string) =>
		name in params ? formatParam(params[name]) : whole
	);
}

export type KeyResult = { ok: true; value: number } | { ok: false; error: string };

/** The answer for drawn parameters: the calculator's own result for the chosen output. */
export function computeKey(spec: CalcSpec, params: Record<string, number | string>): KeyResult {
	const run = runCalculator(spec.calculatorId, params);
	if (!run.ok) return { ok: false, error: run.error };
	const value = (run.outputs as Record<string, unknown>)[spec.output];
	if (typeof value !== 'number' || !Number.isFinite(value))
		return { ok: false, error: `The calculator gives no "${spec.output}" for these parameters` };
	return { ok: true, value };
}

/** Every combination of the ranges' ends (fixed values kept), at most 2^n for n ranges. */
export function cornerParams(spec: CalcSpec): Record<string, number | string>[] {
	let corners: Record<string, number | string>[] = [{}];
	for (const [name, p] of Object.entries(spec.params)) {
		const ends = isRange(p) ? [...new Set([p.min, rangeValue(p, rangeCount(p) - 1)])] : [p.value];
		corners = corners.flatMap((c) => ends.map((v) => ({ ...c, [name]: v })));
	}
	return corners;
}

function inside(def: NumberInputDef, v: number): boolean {
	if (def.min !== undefined && (def.minExclusive ? v <= def.min : v < def.min)) return false;
	if (def.max !== undefined && (def.maxExclusive ? v >= def.max : v > def.max)) return false;
	return true;
}

function limits(def: NumberInputDef): string {
	const lo = def.min === undefined ? '−∞' : `${def.minExclusive ? '>' : '≥'} ${def.min}`;
	const hi = def.max === undefined ? '∞' : `${def.maxExclusive ? '<' : '≤'} ${def.max}`;
	return `${lo} and ${hi}${def.unit ? ` ${def.unit}` : ''}`;
}

/** Most ranges a question may vary at once (the corner check runs 2^n calculations). */
export const MAX_RANGES = 8;

/**
 * Problems with a calculated question, by field: the calculator and output must exist, each
 * parameter must be an input of that calculator with ranges inside the calculator's own limits,
 * the placeholders must name parameters, and the calculator must accept every corner.
 */
export function checkCalcSpec(spec: CalcSpec, template: string): Record<string, string> {
	const errors: Record<string, string> = {};
	if (!isCalculatorId(spec.calculatorId)) {
		errors.calculatorId = 'Choose a calculator from the list.';
		return errors;
	}
	const def = calculators[spec.calculatorId as CalculatorId];
	const output = def.outputs.find((o) => o.name === spec.output && o.kind === 'number');
	if (!output)
		errors.output = `${def.title} has no number output "${spec.output}"; choose one of: ${def.outputs
			.filter((o) => o.kind === 'number')
			.map((o) => o.name)
			.join(', ')}.`;
	const problems: string[] = [];
	let ranges = 0;
	for (const [name, p] of Object.entries(spec.params)) {
		const input = def.inputs.find((i) => i.name === name);
		if (!input) {
			problems.push(`"${name}" is not an input of ${def.title}.`);
			continue;
		}
		if (input.kind === 'list') {
			problems.push(`"${name}" is a list input; calculated questions use number or choice inputs.`);
			continue;
		}
		if (input.kind === 'select') {
			if (isRange(p) || !input.options.some((o) => o.value === p.value))
				problems.push(`"${name}" must be one of: ${input.options.map((o) => o.value).join(', ')}.`);
			continue;
		}
		if (!isRange(p)) {
			if (typeof p.value !== 'number' || !inside(input, p.value))
				problems.push(`"${name}" must be a number between ${limits(input)}.`);
			continue;
		}
		ranges++;
		if (!(p.step > 0)) problems.push(`"${name}": the step must be greater than 0.`);
		else if (p.min > p.max) problems.push(`"${name}": the minimum is above the maximum.`);
		else if (!inside(input, p.min) || !inside(input, p.max))
			problems.push(
				`"${name}": ${p.min}…${p.max} leaves the calculator's range (between ${limits(input)}).`
			);
		else if (input.integer && ![p.min, p.step].every(Number.isInteger))
			problems.push(`"${name}" is a whole number: use whole-number minimum and step.`);
	}
	if (ranges === 0 && !problems.length)
		problems.push('Give at least one parameter a range, so attempts differ.');
	if (ranges > MAX_RANGES) problems.push(`Vary at most ${MAX_RANGES} parameters at once.`);
	if (problems.length) errors.params = problems.join(' ');
	const unknown = placeholders(template).filter((n) => !(n in spec.params));
	if (unknown.length)
		errors.prompt = `The prompt names ${unknown.map((n) => `{${n}}`).join(', ')}, which ${
			unknown.length === 1 ? 'is not a parameter' : 'are not parameters'
		}.`;
	if (!(spec.tolerancePct >= 0 && spec.tolerancePct <= 50))
		errors.tolerancePct = 'The tolerance must be between 0 and 50 %.';
	if (Object.keys(errors).length) return errors;
	for (const corner of cornerParams(spec)) {
		const key = computeKey(spec, corner);
		if (!key.ok) {
			const at = Object.entries(corner)
				.map(([k, v]) => `${k} = ${v}`)
				.join(', ');
			errors.params = `The calculator refuses the corner ${at}: ${key.error}.`;
			break;
		}
	}
	return errors;
}

/**
 * Reads the parameter lines of the question editor, one per line:
 * `bumpCount: 1000..1300 step 50` (a range), `bumpWidthUm = 18` or `basis = bump` (fixed).
 */
export function parseParamLines(
	text: string
): { ok: true; params: Record<string, ParamSpec> } | { ok: false; error: string } {
	const params: Record<string, ParamSpec> = {};
	const num = '([+-]?(?:\\d+(?:\\.\\d*)?|\\.\\d+))';
	const rangeRe = new RegExp(`^${num}\\s*\\.\\.\\s*${num}\\s+step\\s+${num}$`, 'i');
	for (const [k, raw] of text.split(/\r?\n/).entries()) {
		const line = raw.trim();
		if (!line || line.startsWith('#')) continue;
		const m = /^([A-Za-z][A-Za-z0-9]*)\s*[:=]\s*(.+)$/.exec(line);
		if (!m)
			return {
				ok: false,
				error: `Line ${k + 1}: write "name: min..max step s" or "name = value".`
			};
		const [, name, rest] = m;
		if (name in params) return { ok: false, error: `Line ${k + 1}: "${name}" is given twice.` };
		const r = rangeRe.exec(rest.trim());
		if (r) params[name] = { min: Number(r[1]), max: Number(r[2]), step: Number(r[3]) };
		else if (/^[+-]?(?:\d+(?:\.\d*)?|\.\d+)$/.test(rest.trim()))
			params[name] = { value: Number(rest.trim()) };
		else if (/^[a-z][a-z0-9_-]*$/i.test(rest.trim())) params[name] = { value: rest.trim() };
		else
			return {
				ok: false,
				error: `Line ${k + 1}: "${rest.trim()}" is neither a range like 1000..1300 step 50 nor a value.`
			};
	}
	return { ok: true, params };
}

/** The editor's text form of parameters (the inverse of parseParamLines). */
export function formatParamLines(params: Record<string, ParamSpec>): string {
	return Object.entries(params)
		.map(([name, p]) =>
			isRange(p) ? `${name}: ${p.min}..${p.max} step ${p.step}` : `${name} = ${p.value}`
		)
		.join('\n');
}
