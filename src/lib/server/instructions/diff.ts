import { diffArrays, diffLines } from 'diff';

export interface DiffRow {
	left: { n: number; text: string } | null;
	right: { n: number; text: string } | null;
	change: 'same' | 'removed' | 'added' | 'changed';
}

/** A side-by-side source line diff: removed lines on the left, added on the right, paired up. */
export function diffSourceLines(oldSource: string, newSource: string) {
	const parts = diffLines(oldSource, newSource);
	const rows: DiffRow[] = [];
	let ln = 1;
	let rn = 1;
	const split = (v: string) => v.replace(/\n$/, '').split('\n');
	for (let i = 0; i < parts.length; i++) {
		const p = parts[i];
		if (!p.added && !p.removed) {
			for (const t of split(p.value))
				rows.push({ left: { n: ln++, text: t }, right: { n: rn++, text: t }, change: 'same' });
			continue;
		}
		if (p.removed && parts[i + 1]?.added) {
			const l = split(p.value);
			const r = split(parts[i + 1].value);
			for (let k = 0; k < Math.max(l.length, r.length); k++) {
				rows.push({
					left: k < l.length ? { n: ln++, text: l[k] } : null,
					right: k < r.length ? { n: rn++, text: r[k] } : null,
					change: k < l.length && k < r.length ? 'changed' : k < l.length ? 'removed' : 'added'
				});
			}
			i++;
			continue;
		}
		for (const t of split(p.value)) {
			if (p.removed) rows.push({ left: { n: ln++, text: t }, right: null, change: 'removed' });
			else rows.push({ left: null, right: { n: rn++, text: t }, change: 'added' });
		}
	}
	const stats = {
		added: rows.filter((r) => r.change === 'added' || r.change === 'changed').length,
		removed: rows.filter((r) => r.change === 'removed' || r.change === 'changed').length
	};
	return { rows, stats };
}

const VOID = new Set([
	'area',
	'br',
	'col',
	'embed',
	'hr',
	'img',
	'input',
	'link',
	'meta',
	'source',
	'wbr'
]);

/** Splits sanitised HTML into its top-level elements (paragraphs, lists, tables, …). */
export function splitTopLevelBlocks(html: string): string[] {
	const blocks: string[] = [];
	let depth = 0;
	let start = 0;
	const tag = /<(\/?)([a-zA-Z][\w-]*)[^>]*?(\/?)>/g;
	for (const m of html.matchAll(tag)) {
		const [whole, closing, name, selfClosing] = m;
		const lower = name.toLowerCase();
		if (closing) depth--;
		else if (!selfClosing && !VOID.has(lower)) depth++;
		if (depth === 0) {
			const end = m.index! + whole.length;
			const block = html.slice(start, end).trim();
			if (block) blocks.push(block);
			start = end;
		}
	}
	const rest = html.slice(start).trim();
	if (rest) blocks.push(rest);
	return blocks;
}

export interface RenderedBlock {
	html: string;
	change: 'same' | 'removed' | 'added';
}

/** Rendered side-by-side: the blocks of each revision, with removed and added blocks marked. */
export function diffRenderedBlocks(oldHtml: string, newHtml: string) {
	const parts = diffArrays(splitTopLevelBlocks(oldHtml), splitTopLevelBlocks(newHtml));
	const left: RenderedBlock[] = [];
	const right: RenderedBlock[] = [];
	for (const p of parts) {
		for (const html of p.value) {
			if (p.added) right.push({ html, change: 'added' });
			else if (p.removed) left.push({ html, change: 'removed' });
			else {
				left.push({ html, change: 'same' });
				right.push({ html, change: 'same' });
			}
		}
	}
	return { left, right };
}
