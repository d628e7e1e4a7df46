import { describe, expect, it } from 'vitest';
import { diffRenderedBlocks, diffSourceLines, splitTopLevelBlocks } from './diff';

describe('revision diffs', () => {
	it('pairs changed source lines side by side', () => {
		const { rows, stats } = diffSourceLines('a\nb\nc\n', 'a\nB\nc\nd\n');
		expect(rows.map((r) => r.change)).toEqual(['same', 'changed', 'same', 'added']);
		expect(rows[1]).toMatchObject({ left: { n: 2, text: 'b' }, right: { n: 2, text: 'B' } });
		expect(stats).toEqual({ added: 2, removed: 1 });
	});
	it('splits rendered HTML into top-level blocks, void elements included', () => {
		expect(
			splitTopLevelBlocks('<h1 id="a">A</h1>\n<p>x<br>y</p>\n<ol><li>1</li></ol><hr>')
		).toEqual(['<h1 id="a">A</h1>', '<p>x<br>y</p>', '<ol><li>1</li></ol>', '<hr>']);
	});
	it('marks removed and added rendered blocks', () => {
		const d = diffRenderedBlocks('<p>same</p><p>old</p>', '<p>same</p><p>new</p>');
		expect(d.left.map((b) => b.change)).toEqual(['same', 'removed']);
		expect(d.right.map((b) => b.change)).toEqual(['same', 'added']);
	});
});
