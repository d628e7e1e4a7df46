import { describe, expect, it } from 'vitest';
import { makeSnippet, markMatches, queryTerms } from './snippet';

describe('search snippets', () => {
	it('escapes HTML before marking matches', () => {
		const out = markMatches('<img src=x onerror=alert(1)> thaw the reel', ['thaw']);
		expect(out).toBe('&lt;img src=x onerror=alert(1)&gt; <mark>thaw</mark> the reel');
	});
	it('marks word prefixes case-insensitively and not inside words', () => {
		expect(markMatches('Thawing rethaw', ['thaw'])).toBe('<mark>Thaw</mark>ing rethaw');
	});
	it('ignores one-letter terms and regex characters', () => {
		expect(queryTerms('a (b) c++ IPA')).toEqual(['ipa']);
		expect(markMatches('a.b', ['.'])).toBe('a.b');
	});
	it('centres the window on the first match', () => {
		const text = `${'word '.repeat(100)}buffer sheet ${'tail '.repeat(100)}`;
		const s = makeSnippet(text, ['buffer'], 60);
		expect(s.startsWith('… ')).toBe(true);
		expect(s).toContain('<mark>buffer</mark>');
		expect(s.endsWith(' …')).toBe(true);
	});
});
