import { z } from 'zod';

/** Shows an input only while another (select) input holds one of the listed values. */
export interface InputCondition {
	input: string;
	equals: readonly string[];
}

interface BaseInputDef {
	name: string;
	label: string;
	help: string;
	/** The field may be left empty (cross-field rules may still require it). */
	optional?: boolean;
	/** Replaces "<label> is required" when the field is missing. */
	requiredMessage?: string;
	when?: InputCondition;
}

/** A value a page can offer as a one-click preset, e.g. a handbook CTE. */
export interface InputSuggestion {
	label: string;
	value: number;
}

export interface NumberInputDef extends BaseInputDef {
	kind: 'number';
	unit: string;
	default?: number;
	min?: number;
	max?: number;
	minExclusive?: boolean;
	maxExclusive?: boolean;
	integer?: boolean;
	step: number;
	suggestions?: readonly InputSuggestion[];
}

export interface SelectOption {
	value: string;
	label: string;
	/** For option lists that depend on another input (units: the quantity). */
	group?: string;
}

export interface SelectInputDef extends BaseInputDef {
	kind: 'select';
	unit: '';
	options: readonly SelectOption[];
	default?: string;
	/** Extra spellings accepted from the API and forms, mapped to an option value. */
	aliases?: Readonly<Record<string, string>>;
}

export interface ListInputDef extends BaseInputDef {
	kind: 'list';
	unit: '';
	itemLabel: string;
	itemFields: readonly NumberInputDef[];
	minItems: number;
	maxItems: number;
	default: readonly Readonly<Record<string, number>>[];
}

export type InputDef = NumberInputDef | SelectInputDef | ListInputDef;

/** Raised by a compute function for input that passes the schema but still cannot be computed. */
export class CalculatorInputError extends Error {
	readonly fields: Record<string, string>;

	constructor(message: string, fields: Record<string, string> = {}) {
		super(message);
		this.name = 'CalculatorInputError';
		this.fields = fields;
	}
}

export interface CalculatorResult<O> {
	outputs: O;
	warnings: string[];
}

// Decimal notation only: Number() would also accept '0x10', 'Infinity' and '' (as 0).
const DECIMAL = /^[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?$/;

function requiredMessage(def: BaseInputDef): string {
	return def.requiredMessage ?? `${def.label} is required`;
}

function withUnit(value: number, unit: string): string {
	return unit === '' ? String(value) : `${value} ${unit}`;
}

function rangeMessage(def: NumberInputDef, value: number): string | null {
	const { min, max, label, unit } = def;
	const belowMin = min !== undefined && (def.minExclusive ? value <= min : value < min);
	const aboveMax = max !== undefined && (def.maxExclusive ? value >= max : value > max);
	if (!belowMin && !aboveMax) return null;
	if (belowMin && def.minExclusive && min !== undefined) {
		return `${label} must be greater than ${withUnit(min, unit)}`;
	}
	if (min !== undefined && max !== undefined) {
		return `${label} must be between ${min} and ${withUnit(max, unit)}`;
	}
	if (belowMin && min !== undefined) return `${label} must be at least ${withUnit(min, unit)}`;
	if (max !== undefined && def.maxExclusive) {
		return `${label} must be less than ${withUnit(max, unit)}`;
	}
	return `${label} must be at most ${withUnit(max as number, unit)}`;
}

type NumberParse = { ok: true; value: number | undefined } | { ok: false; message: string };

function parseNumber(def: NumberInputDef, raw: unknown, allowMissing: boolean): NumberParse {
	if (
		raw === undefined ||
		raw === null ||
		(allowMissing && typeof raw === 'string' && raw.trim() === '')
	) {
		return allowMissing
			? { ok: true, value: undefined }
			: { ok: false, message: requiredMessage(def) };
	}
	let value: number;
	if (typeof raw === 'number') {
		value = raw;
	} else if (typeof raw === 'string') {
		const text = raw.trim();
		if (text === '') return { ok: false, message: `${def.label} is empty; enter a number` };
		if (!DECIMAL.test(text)) return { ok: false, message: `${def.label} must be a number` };
		value = Number(text);
	} else {
		return { ok: false, message: `${def.label} must be a number` };
	}
	if (!Number.isFinite(value)) {
		return { ok: false, message: `${def.label} must be a finite number` };
	}
	if (def.integer && !Number.isInteger(value)) {
		return { ok: false, message: `${def.label} must be a whole number` };
	}
	const outOfRange = rangeMessage(def, value);
	if (outOfRange) return { ok: false, message: outOfRange };
	return { ok: true, value };
}

/** A required number: accepts numbers and decimal strings, rejects empty strings and NaN. */
export function numberSchema(def: NumberInputDef) {
	return z.unknown().transform((raw, ctx): number => {
		const parsed = parseNumber(def, raw, false);
		if (!parsed.ok) {
			ctx.addIssue({ code: 'custom', message: parsed.message });
			return z.NEVER;
		}
		return parsed.value as number;
	});
}

/**
 * An optional number. An empty form field ('' or null) counts as not given rather than as zero;
 * rules about which optional fields must appear together live in each calculator's schema.
 */
export function optionalNumberSchema(def: NumberInputDef) {
	return z
		.unknown()
		.transform((raw, ctx): number | undefined => {
			const parsed = parseNumber(def, raw, true);
			if (!parsed.ok) {
				ctx.addIssue({ code: 'custom', message: parsed.message });
				return z.NEVER;
			}
			return parsed.value;
		})
		.optional();
}

/** A select: one of the option values (or a listed alias), as a string literal union. */
export function selectSchema<const V extends string>(
	def: SelectInputDef & { options: readonly { value: V }[] }
) {
	const values = def.options.map((option) => option.value);
	return z.unknown().transform((raw, ctx): V => {
		if (raw === undefined || raw === null || (typeof raw === 'string' && raw.trim() === '')) {
			ctx.addIssue({ code: 'custom', message: requiredMessage(def) });
			return z.NEVER;
		}
		if (typeof raw === 'string') {
			const text = raw.trim();
			const value = def.aliases?.[text] ?? text;
			if ((values as string[]).includes(value)) return value as V;
		}
		ctx.addIssue({
			code: 'custom',
			message: `${def.label} must be one of: ${values.join(', ')}`
		});
		return z.NEVER;
	});
}

/** The zod object shape for one list item, from its field definitions. */
function itemSchema<const F extends readonly NumberInputDef[]>(fields: F, itemLabel: string) {
	const shape: Record<string, ReturnType<typeof numberSchema>> = {};
	for (const field of fields) shape[field.name] = numberSchema(field);
	const names = fields.map((field) => field.name).join(', ');
	// The cast names the keys, which a shape built in a loop cannot carry in its type.
	return z.object(shape, {
		error: `Each ${itemLabel} must be an object with ${names}`
	}) as unknown as z.ZodType<Record<F[number]['name'], number>>;
}

/** A list of records of numbers; forms may send it as a JSON string. */
export function listSchema<const F extends readonly NumberInputDef[]>(
	def: ListInputDef & { itemFields: F }
) {
	return z.preprocess(
		(raw) => {
			if (typeof raw !== 'string') return raw;
			try {
				return JSON.parse(raw);
			} catch {
				return raw;
			}
		},
		z
			.array(itemSchema(def.itemFields, def.itemLabel), {
				error: (issue) =>
					issue.input === undefined ? requiredMessage(def) : `${def.label} must be a list`
			})
			.min(def.minItems, {
				error:
					def.minItems === 1
						? `Add at least one ${def.itemLabel}`
						: `Add at least ${def.minItems} ${def.itemLabel}s`
			})
			.max(def.maxItems, { error: `${def.label} can hold at most ${def.maxItems} entries` })
	);
}

/** Turns zod issues into field path → first message for that path. */
export function issuesToFields(issues: readonly z.core.$ZodIssue[]): Record<string, string> {
	const fields: Record<string, string> = {};
	for (const issue of issues) {
		const path = issue.path.map(String).join('.');
		const key = path === '' ? '_' : path;
		if (!(key in fields)) fields[key] = issue.message;
	}
	return fields;
}

/** The first path in a nested value holding a number that is NaN or infinite, or null. */
export function findNonFinite(value: unknown, path = ''): string | null {
	if (typeof value === 'number') return Number.isFinite(value) ? null : path || '_';
	if (Array.isArray(value)) {
		for (let i = 0; i < value.length; i++) {
			const found = findNonFinite(value[i], path ? `${path}.${i}` : String(i));
			if (found) return found;
		}
		return null;
	}
	if (value !== null && typeof value === 'object') {
		for (const [key, inner] of Object.entries(value)) {
			const found = findNonFinite(inner, path ? `${path}.${key}` : key);
			if (found) return found;
		}
	}
	return null;
}

/**
 * 1 − e^x without cancellation, for turning log(1 − P) back into P. Written as 0 − expm1(x)
 * rather than −expm1(x) so that a zero probability comes out as +0, not −0.
 */
export function oneMinusExp(x: number): number {
	return 0 - Math.expm1(x);
}
