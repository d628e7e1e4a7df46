// How calculator numbers are shown on screen and in copied text.
import type { CalculatorDef, OutputDef } from './registry';
import type { FormValues } from './form-values';
import { shownInputs } from './form-values';

const SUPERSCRIPT: Record<string, string> = {
	'-': '⁻',
	'+': '',
	'0': '⁰',
	'1': '¹',
	'2': '²',
	'3': '³',
	'4': '⁴',
	'5': '⁵',
	'6': '⁶',
	'7': '⁷',
	'8': '⁸',
	'9': '⁹'
};

// Outside this band plain decimals get too many zeros to read at a glance.
const SMALLEST_PLAIN = 1e-4;
const LARGEST_PLAIN = 1e9;
const NARROW_NBSP = '\u202f';

function groupThousands(integerPart: string): string {
	// SI style: digits in groups of three with a narrow space, only from five digits up.
	if (integerPart.length < 5) return integerPart;
	return integerPart.replace(/\B(?=(\d{3})+(?!\d))/g, NARROW_NBSP);
}

export interface FormatOptions {
	/** Plain ASCII (`1.5e-12`, `-3`, no digit groups) for copied text and spreadsheets. */
	plain?: boolean;
}

/** A number to `digits` significant digits, trailing zeros dropped; tiny and huge ones as powers of ten. */
export function formatNumber(value: number, digits: number, options: FormatOptions = {}): string {
	if (!Number.isFinite(value)) return '—';
	if (value === 0) return '0';
	const minus = options.plain ? '-' : '\u2212';
	const sign = value < 0 ? minus : '';
	const magnitude = Math.abs(value);
	const rounded = Number(magnitude.toPrecision(digits));
	if (rounded >= SMALLEST_PLAIN && rounded < LARGEST_PLAIN) {
		// toPrecision can answer in exponent form (1.235e+6), so the digits are laid out again here.
		const decimals = Math.min(20, Math.max(0, digits - 1 - Math.floor(Math.log10(rounded))));
		let fixed = rounded.toFixed(decimals);
		if (fixed.includes('.')) fixed = fixed.replace(/0+$/, '').replace(/\.$/, '');
		if (options.plain) return sign + fixed;
		const [integerPart, fraction] = fixed.split('.');
		return sign + groupThousands(integerPart) + (fraction ? `.${fraction}` : '');
	}
	const [mantissa, exponent] = magnitude.toExponential(Math.max(0, digits - 1)).split('e');
	const shortMantissa = mantissa.includes('.') ? mantissa.replace(/\.?0+$/, '') : mantissa;
	if (options.plain) return `${sign}${shortMantissa}e${exponent.replace('+', '')}`;
	const power = [...exponent].map((c) => SUPERSCRIPT[c]).join('');
	return `${sign}${shortMantissa} × 10${power}`;
}

/** A number output for display: its formatted value, or a dash when the calculator gave none. */
export function formatOutput(output: OutputDef, value: unknown, options: FormatOptions = {}) {
	return typeof value === 'number' ? formatNumber(value, output.digits, options) : '—';
}

const withUnit = (value: string, unit: string) => (unit ? `${value} ${unit}` : value);

/** The unit shown beside an input; the Units calculator's value is in its "from" unit. */
export function inputUnit(def: CalculatorDef, name: string, values: FormValues): string {
	if (def.id === 'units' && name === 'value') {
		const from = values.from;
		return typeof from === 'string' ? from : '';
	}
	return def.inputs.find((input) => input.name === name)?.unit ?? '';
}

/** The unit of an output; the Units calculator's result is in its "to" unit. */
export function outputUnit(def: CalculatorDef, output: OutputDef, values: FormValues): string {
	if (def.id === 'units' && output.name === 'value') {
		const to = values.to;
		return typeof to === 'string' ? to : '';
	}
	return output.unit;
}

/** Plain text of a calculation for the clipboard: inputs, results, warnings, link and caution. */
export function resultText(
	def: CalculatorDef,
	values: FormValues,
	outputs: object,
	warnings: readonly string[],
	link: string,
	caution: string
): string {
	const lines = [`${def.title} (Padbridge calculator)`, '', 'Inputs'];
	for (const input of shownInputs(def, values)) {
		const value = values[input.name];
		if (input.kind === 'list') {
			lines.push(`  ${input.label}:`);
			for (const row of value as Record<string, string>[]) {
				const cells = input.itemFields.map((f) => `${f.label} ${withUnit(row[f.name], f.unit)}`);
				lines.push(`    - ${cells.join(', ')}`);
			}
			continue;
		}
		const textValue = value as string;
		if (textValue.trim() === '') continue;
		const shownValue =
			input.kind === 'select'
				? (input.options.find((o) => o.value === textValue)?.label ?? textValue)
				: withUnit(textValue.trim(), inputUnit(def, input.name, values));
		lines.push(`  ${input.label}: ${shownValue}`);
	}
	lines.push('', 'Results');
	for (const output of def.outputs) {
		if (output.kind !== 'number' || !(output.name in outputs)) continue;
		const unit = outputUnit(def, output, values);
		const raw = (outputs as Record<string, unknown>)[output.name];
		const value = formatOutput(output, raw, { plain: true });
		lines.push(`  ${output.label}: ${withUnit(value, value === '—' ? '' : unit)}`);
	}
	if (warnings.length) {
		lines.push('', 'Warnings');
		for (const warning of warnings) lines.push(`  - ${warning}`);
	}
	lines.push('', `Inputs link: ${link}`, '', caution);
	return lines.join('\n');
}
