// Shiki set up once per process with five grammars and one theme through the fine-grained core
// API, so no other grammar or theme is ever loaded. Plain JavaScript because svelte.config.js
// (mdsvex, at build time) imports it as well as the server-side instruction renderer.
import { createCssVariablesTheme, createHighlighterCore } from 'shiki/core';
import { createJavaScriptRegexEngine } from 'shiki/engine/javascript';

/** @typedef {import('shiki/core').HighlighterCore} HighlighterCore */
/** @typedef {import('shiki/core').ShikiTransformer} ShikiTransformer */

const THEME = 'padbridge';

// The css-variables theme names each token by its role (keyword, string, comment ...); the
// transformer below turns those into classes, so highlighted code carries no style attributes.
const theme = createCssVariablesTheme({ name: THEME, variablePrefix: '--tok-', fontStyle: true });

/** Info-string spellings authors use → the grammar that highlights them. */
const LANGUAGES = /** @type {const} */ ({
	ini: 'ini',
	conf: 'ini',
	cfg: 'ini',
	recipe: 'ini',
	properties: 'ini',
	yaml: 'yaml',
	yml: 'yaml',
	json: 'json',
	csv: 'csv',
	shell: 'shellscript',
	sh: 'shellscript',
	bash: 'shellscript',
	shellscript: 'shellscript',
	console: 'shellscript',
	text: 'text',
	txt: 'text',
	plain: 'text',
	plaintext: 'text'
});

/** The info strings that get highlighting, for help texts and warnings. */
export const HIGHLIGHTED_LANGUAGES = Object.freeze(Object.keys(LANGUAGES));

/**
 * The grammar for an info-string language, `'text'` for none, or null when it is not supported.
 * @param {string | null | undefined} lang
 * @returns {string | null}
 */
export function resolveLanguage(lang) {
	const key = (lang ?? '').trim().toLowerCase();
	if (key === '') return 'text';
	return Object.hasOwn(LANGUAGES, key)
		? LANGUAGES[/** @type {keyof typeof LANGUAGES} */ (key)]
		: null;
}

/** @type {Promise<HighlighterCore> | null} */
let pending = null;

/**
 * The process-wide highlighter, created on first use.
 * @returns {Promise<HighlighterCore>}
 */
export function getHighlighter() {
	pending ??= createHighlighterCore({
		themes: [theme],
		langs: [
			import('shiki/langs/ini.mjs'),
			import('shiki/langs/yaml.mjs'),
			import('shiki/langs/json.mjs'),
			import('shiki/langs/csv.mjs'),
			import('shiki/langs/shellscript.mjs')
		],
		engine: createJavaScriptRegexEngine()
	}).catch((error) => {
		pending = null;
		throw error;
	});
	return pending;
}

const TOKEN_VAR = /^color:var\(--tok-token-([a-z-]+)\)$/;

/**
 * Moves the theme's inline styles onto classes (`tok-keyword`, `tok-italic`...).
 * @type {ShikiTransformer}
 */
const styleToClass = {
	pre(node) {
		delete node.properties.style;
		this.addClassToHast(node, `lang-${this.options.lang}`);
	},
	span(node) {
		const style = node.properties.style;
		if (typeof style !== 'string') return;
		delete node.properties.style;
		/** @type {string[]} */
		const classes = [];
		for (const part of style.split(';')) {
			const match = TOKEN_VAR.exec(part.trim());
			if (match) classes.push(`tok-${match[1]}`);
			else if (part.includes('font-style:italic')) classes.push('tok-italic');
			else if (part.includes('font-weight:bold')) classes.push('tok-bold');
			else if (part.includes('text-decoration:underline')) classes.push('tok-underline');
		}
		if (classes.length) this.addClassToHast(node, classes);
	}
};

/**
 * Highlighted HTML (`<pre class="shiki ...">`) for code in a supported language; unsupported
 * languages come out as plain text.
 * @param {HighlighterCore} highlighter
 * @param {string} code
 * @param {string | null | undefined} lang
 * @returns {string}
 */
export function highlightCode(highlighter, code, lang) {
	const grammar = resolveLanguage(lang) ?? 'text';
	return highlighter.codeToHtml(code.replace(/\n$/, ''), {
		lang: grammar,
		theme: THEME,
		transformers: [styleToClass]
	});
}

/**
 * Escapes what the Svelte compiler would read as markup in mdsvex output: curly braces start
 * expressions and backslash sequences are rewritten inside template strings.
 * @param {string} html
 * @returns {string}
 */
export function escapeForSvelte(html) {
	return html
		.replace(/[{}`]/g, (c) => (c === '{' ? '&#123;' : c === '}' ? '&#125;' : '&#96;'))
		.replace(/\\/g, '&#92;');
}

/**
 * mdsvex `highlight.highlighter`: runs at build time, so shiki never reaches the browser.
 * The tabindex lets keyboard users scroll a wide block; Svelte's a11y check does not know that
 * a scrollable <pre> is meant to take focus, hence the ignore comment.
 * @param {string} code
 * @param {string | null | undefined} lang
 * @returns {Promise<string>}
 */
export async function highlightForMdsvex(code, lang) {
	const html = escapeForSvelte(highlightCode(await getHighlighter(), code, lang));
	return `<!-- svelte-ignore a11y_no_noninteractive_tabindex -->${html}`;
}
