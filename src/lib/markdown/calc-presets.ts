import type { z } from 'zod';
import { listSchema, numberSchema, selectSchema } from '../calculators/fields';
import {
	calculators,
	defaultInputs,
	type CalculatorId,
	type InputDef
} from '../calculators/registry';

export interface ParsedCalcPresets {
	/** Input name → the value as written; values that fail validation are kept so the calculator shows the error. */
	presets: Record<string, string>;
	warnings: string[];
}

/** Longer values are refused: nothing a calculator takes (not even a list as JSON) needs more. */
const MAX_VALUE_CHARS = 4000;

// Building a zod schema costs far more than using one; the registry's input definitions never change.
const schemas = new WeakMap<InputDef, z.ZodType>();

function schemaFor(def: InputDef): z.ZodType {
	let schema = schemas.get(def);
	if (!schema) {
		schema =
			def.kind === 'number'
				? numberSchema(def)
				: def.kind === 'select'
					? selectSchema(def)
					: listSchema(def);
		schemas.set(def, schema);
	}
	return schema;
}

function validateValue(def: InputDef, value: string): string | null {
	const result = schemaFor(def).safeParse(value);
	return result.success ? null : (result.error.issues[0]?.message ?? 'invalid value');
}

/**
 * Reads the body of a ```calc <id>``` block: one `input: value` per line, blank lines and lines
 * starting with `#` ignored. Every problem becomes a warning for the author; nothing throws.
 * `firstLine` is the document line number of the body's first line, for the warnings.
 */
export function parseCalcPresets(id: CalculatorId, body: string, firstLine = 1): ParsedCalcPresets {
	const defs = calculators[id].inputs;
	const byName = new Map<string, InputDef>(defs.map((def) => [def.name, def]));
	const presets: Record<string, string> = {};
	const keyLines = new Map<string, number>();
	const warnings: string[] = [];
	const where = (index: number) => `Line ${firstLine + index} (calc ${id})`;

	body.split(/\r?\n/).forEach((raw, lineNo) => {
		const line = raw.trim();
		if (line === '' || line.startsWith('#')) return;
		const colon = line.indexOf(':');
		if (colon <= 0) {
			warnings.push(`${where(lineNo)}: write "input: value" (got "${line.slice(0, 60)}")`);
			return;
		}
		const key = line.slice(0, colon).trim();
		const value = line.slice(colon + 1).trim();
		const def = byName.get(key);
		if (!def) {
			const sameLetters = defs.find((d) => d.name.toLowerCase() === key.toLowerCase());
			const hint = sameLetters
				? `did you mean "${sameLetters.name}"?`
				: `inputs are ${defs.map((d) => d.name).join(', ')}`;
			warnings.push(`${where(lineNo)}: unknown input "${key.slice(0, 60)}"; ${hint}`);
			return;
		}
		if (Object.hasOwn(presets, key)) {
			warnings.push(`${where(lineNo)}: "${key}" is set twice; the first value is used`);
			return;
		}
		if (value === '') {
			warnings.push(`${where(lineNo)}: "${key}" has no value`);
			return;
		}
		if (value.length > MAX_VALUE_CHARS) {
			warnings.push(`${where(lineNo)}: the value of "${key}" is too long`);
			return;
		}
		const problem = validateValue(def, value);
		if (problem) warnings.push(`${where(lineNo)}: ${problem}`);
		presets[key] = value;
		keyLines.set(key, lineNo);
	});

	// An input shown only for another input's value (bump size on the bump basis) is ignored otherwise.
	const defaults = defaultInputs(id);
	for (const key of Object.keys(presets)) {
		const when = byName.get(key)?.when;
		if (!when) continue;
		const controlling = presets[when.input] ?? defaults[when.input];
		if (typeof controlling === 'string' && !when.equals.includes(controlling)) {
			warnings.push(
				`${where(keyLines.get(key) ?? 0)}: "${key}" is only used when ${when.input} is ${when.equals.join(' or ')}`
			);
		}
	}
	return { presets, warnings };
}

/** The preset value in words for the block's fallback table (option labels, units, list items). */
export function describePreset(id: CalculatorId, key: string, value: string): string {
	const def = calculators[id].inputs.find((d) => d.name === key);
	if (!def) return value;
	if (def.kind === 'number') return def.unit ? `${value} ${def.unit}` : value;
	if (def.kind === 'select') {
		const text = def.aliases?.[value] ?? value;
		return def.options.find((option) => option.value === text)?.label ?? value;
	}
	try {
		const items: unknown = JSON.parse(value);
		if (!Array.isArray(items)) return value;
		return items
			.map((item: Record<string, unknown>) =>
				def.itemFields
					.map((field) => `${String(item?.[field.name] ?? '?')} ${field.unit}`.trim())
					.join(' / ')
			)
			.join('; ');
	} catch {
		return value;
	}
}
