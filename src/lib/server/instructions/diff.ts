import { diffLines } from 'diff';

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
