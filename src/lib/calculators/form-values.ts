// What a calculator form holds (text as typed, lists as rows of text) and how it travels: in the
// page URL, in a share link, in the preset lines of an embedded block, and into runCalculator.
import type { CalculatorDef } from './registry';
import type { InputDef, ListInputDef } from './fields';

export type ListRow = Record<string, string>;
export type FormValue = string | ListRow[];
export type FormValues = Record<string, FormValue>;

export interface AppliedEntries {
	values: FormValues;
	/** Keys that name no input of this calculator (or a list value that could not be read). */
	ignored: string[];
}

// Far longer than any number; keeps a crafted URL from dragging megabytes through the form.
const MAX_VALUE_LENGTH = 400;
const ROW_KEY = /^([A-Za-z][A-Za-z0-9]*)\.([0-9]{1,4})\.([A-Za-z][A-Za-z0-9]*)$/;

const text = (value: unknown): string =>
	value === undefined || value === null ? '' : String(value);

function emptyRow(list: ListInputDef): ListRow {
	return Object.fromEntries(list.itemFields.map((field) => [field.name, '']));
}

function rowOf(list: ListInputDef, item: Readonly<Record<string, unknown>>): ListRow {
	return Object.fromEntries(list.itemFields.map((field) => [field.name, text(item[field.name])]));
}

function cloneValue(value: FormValue): FormValue {
	return typeof value === 'string' ? value : value.map((row) => ({ ...row }));
}

export function cloneFormValues(values: FormValues): FormValues {
	return Object.fromEntries(Object.entries(values).map(([key, value]) => [key, cloneValue(value)]));
}

/** The form as a calculator page opens: every input at its default, empty where it has none. */
export function defaultFormValues(def: CalculatorDef): FormValues {
	const values: FormValues = {};
	for (const input of def.inputs) {
		values[input.name] =
			input.kind === 'list' ? input.default.map((item) => rowOf(input, item)) : text(input.default);
	}
	return values;
}

/** Whether an input applies, given the select it depends on (e.g. bump sizes for the bump basis). */
export function isInputShown(input: InputDef, values: FormValues): boolean {
	if (!input.when) return true;
	const controlling = values[input.when.input];
	return typeof controlling === 'string' && input.when.equals.includes(controlling.trim());
}

export function shownInputs(def: CalculatorDef, values: FormValues): InputDef[] {
	return def.inputs.filter((input) => isInputShown(input, values));
}

/** A whole list given as one value: empty for no rows, or a JSON array of row objects. */
function parseListValue(list: ListInputDef, value: string): ListRow[] | null {
	const trimmed = value.trim();
	if (trimmed === '') return [];
	try {
		const parsed: unknown = JSON.parse(trimmed);
		if (!Array.isArray(parsed)) return null;
		return parsed
			.slice(0, list.maxItems + 1)
			.map((item) =>
				item !== null && typeof item === 'object'
					? rowOf(list, item as Record<string, unknown>)
					: emptyRow(list)
			);
	} catch {
		return null;
	}
}

/**
 * Lays `key=value` pairs over a starting form. Plain keys set an input; `list.N.field` keys build
 * list rows (rows come out in index order, gaps closed), and a list named on its own with an empty
 * value, or with a JSON array, sets the whole list.
 */
export function applyEntries(
	def: CalculatorDef,
	base: FormValues,
	entries: Iterable<readonly [string, string]>
): AppliedEntries {
	const values = cloneFormValues(base);
	const ignored: string[] = [];
	const byName = new Map(def.inputs.map((input) => [input.name, input]));
	const rows = new Map<string, Map<number, ListRow>>();
	for (const [key, raw] of entries) {
		const value = raw.slice(0, MAX_VALUE_LENGTH);
		const input = byName.get(key);
		if (input?.kind === 'list') {
			const list = parseListValue(input, value);
			if (list === null) ignored.push(key);
			else values[key] = list;
			continue;
		}
		if (input) {
			values[key] = value;
			continue;
		}
		const match = ROW_KEY.exec(key);
		const list = match ? byName.get(match[1]) : undefined;
		if (match && list?.kind === 'list' && list.itemFields.some((f) => f.name === match[3])) {
			const listRows = rows.get(list.name) ?? new Map<number, ListRow>();
			const index = Number(match[2]);
			// One row past the limit is kept so that the calculator can say the list is too long.
			if (!listRows.has(index) && listRows.size > list.maxItems) continue;
			const row = listRows.get(index) ?? emptyRow(list);
			row[match[3]] = value;
			listRows.set(index, row);
			rows.set(list.name, listRows);
			continue;
		}
		ignored.push(key);
	}
	for (const [name, listRows] of rows) {
		values[name] = [...listRows.entries()].sort((a, b) => a[0] - b[0]).map(([, row]) => row);
	}
	return { values, ignored };
}

/** Appends a row to a list, copying the last one (a new segment usually continues the profile). */
export function addListRow(list: ListInputDef, rows: readonly ListRow[]): ListRow[] {
	if (rows.length >= list.maxItems) return rows.map((row) => ({ ...row }));
	const last = rows.at(-1);
	return [...rows.map((row) => ({ ...row })), last ? { ...last } : emptyRow(list)];
}

export function removeListRow(rows: readonly ListRow[], index: number): ListRow[] {
	return rows.filter((_, j) => j !== index).map((row) => ({ ...row }));
}

/**
 * The form a calculator page shows for its URL: defaults, overlaid with the query, then the row
 * buttons of the form without JavaScript (`_add=<list>`, `_remove=<list>.<index>`).
 */
export function formValuesFromQuery(def: CalculatorDef, params: URLSearchParams): FormValues {
	const { values } = applyEntries(def, defaultFormValues(def), params.entries());
	const add = params.get('_add');
	const remove = params.get('_remove');
	for (const input of def.inputs) {
		if (input.kind !== 'list') continue;
		const rows = values[input.name] as ListRow[];
		if (add === input.name) values[input.name] = addListRow(input, rows);
		const match = remove ? /^(.+)\.([0-9]{1,4})$/.exec(remove) : null;
		if (match && match[1] === input.name)
			values[input.name] = removeListRow(rows, Number(match[2]));
	}
	return values;
}

/** The form an embedded calculator block starts from: defaults with the block's presets. */
export function formValuesFromPresets(
	def: CalculatorDef,
	presets: Readonly<Record<string, string>> = {}
): AppliedEntries {
	return applyEntries(def, defaultFormValues(def), Object.entries(presets));
}

/** What runCalculator receives: the inputs that apply, as typed (it parses and checks them). */
export function toRawInput(def: CalculatorDef, values: FormValues): Record<string, unknown> {
	const raw: Record<string, unknown> = {};
	for (const input of shownInputs(def, values)) {
		const value = values[input.name];
		if (value === undefined) continue;
		raw[input.name] = typeof value === 'string' ? value : value.map((row) => ({ ...row }));
	}
	return raw;
}

const sameRows = (a: readonly ListRow[], b: readonly ListRow[]) =>
	a.length === b.length &&
	a.every((row, j) => Object.keys(row).every((key) => row[key] === b[j][key]));

/** Query parameters for the inputs that apply and differ from their defaults. */
export function toQuery(def: CalculatorDef, values: FormValues): URLSearchParams {
	const defaults = defaultFormValues(def);
	const params = new URLSearchParams();
	for (const input of shownInputs(def, values)) {
		const value = values[input.name];
		const fallback = defaults[input.name];
		if (typeof value === 'string') {
			if (value !== fallback) params.set(input.name, value);
			continue;
		}
		if (value === undefined || sameRows(value, fallback as ListRow[])) continue;
		if (value.length === 0) params.set(input.name, '');
		value.forEach((row, j) => {
			for (const field of Object.keys(row)) params.set(`${input.name}.${j}.${field}`, row[field]);
		});
	}
	return params;
}

/** A site-relative link to the calculator page that reopens these inputs. */
export function shareHref(def: CalculatorDef, values: FormValues): string {
	const query = toQuery(def, values).toString();
	return `/calculators/${def.id}${query ? `?${query}` : ''}`;
}
