import { describe, expect, it } from 'vitest';
import { escapeForSvelte, highlightForMdsvex, resolveLanguage } from './highlighter.js';

describe('resolveLanguage', () => {
	it('maps the spellings authors use to the five grammars', () => {
		expect(resolveLanguage('INI')).toBe('ini');
		expect(resolveLanguage('recipe')).toBe('ini');
		expect(resolveLanguage('yml')).toBe('yaml');
		expect(resolveLanguage('sh')).toBe('shellscript');
		expect(resolveLanguage('')).toBe('text');
		expect(resolveLanguage(undefined)).toBe('text');
		expect(resolveLanguage('python')).toBeNull();
		expect(resolveLanguage('constructor')).toBeNull();
	});
});

describe('mdsvex output', () => {
	it('escapes what Svelte would read as an expression', () => {
		expect(escapeForSvelte('{a} `b` \\n')).toBe('&#123;a&#125; &#96;b&#96; &#92;n');
	});

	it('highlights at build time with classes only', async () => {
		const html = await highlightForMdsvex('{"force_n": 72}', 'json');
		expect(html).toContain('<pre class="shiki padbridge lang-json" tabindex="0">');
		expect(html).toContain('<span class="tok-keyword">"force_n"</span>');
		expect(html).not.toMatch(/[{}]/);
		expect(html).not.toContain('style=');
	});
});
