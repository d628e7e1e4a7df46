// Server-side only: importing this module from browser code would ship shiki and sanitize-html.
import MarkdownIt from 'markdown-it';
import type { Env, Token } from 'markdown-it';
import {
	CALCULATOR_CAUTION,
	calculatorIds,
	calculators,
	isCalculatorId,
	type CalculatorId
} from '../calculators/registry';
import { describePreset, parseCalcPresets } from './calc-presets';
import { calloutPlugin, type CalloutEnv, type CalloutKind } from './callout-rule';
import {
	getHighlighter,
	highlightCode,
	HIGHLIGHTED_LANGUAGES,
	resolveLanguage
} from './highlighter.js';
import { sanitizeInstructionHtml } from './sanitize';

export interface RenderedInstruction {
	html: string;
	/** Plain text for search. */
	text: string;
	headings: { level: number; text: string; id: string }[];
	/** Text of the numbered steps, in document order. */
	steps: string[];
	calculators: { id: string; presets: Record<string, string> }[];
	/** Image and attachment refs used (`asset:<name>` without the prefix), first use first. */
	assets: string[];
	/** Problems for the author: unknown calculator ids, missing files, refused links … */
	warnings: string[];
}

export interface RenderOptions {
	/** Maps a file name uploaded to the revision to the URL it is served from, or null if unknown. */
	resolveAsset?: (ref: string) => string | null;
}

type Highlighter = Awaited<ReturnType<typeof getHighlighter>>;

type RenderEnv = Env &
	CalloutEnv & {
		highlighter: Highlighter;
		resolveAsset?: (ref: string) => string | null;
		problems: Problem[];
		assets: string[];
		calculators: { id: CalculatorId; presets: Record<string, string> }[];
		images: WeakMap<Token, ImageMeta>;
		fences: WeakMap<Token, FenceMeta>;
	};

/** A warning and the document line it is about (0 when none), so warnings read top to bottom. */
interface Problem {
	line: number;
	message: string;
}

interface ImageMeta {
	url: string | null;
	reason: string;
	figure: boolean;
}

type FenceMeta =
	| { kind: 'code'; grammar: string | null }
	| { kind: 'calc'; id: CalculatorId; presets: Record<string, string> }
	| { kind: 'calc-unknown'; id: string };

const CALLOUT_WORDS: Record<CalloutKind, { icon: string; word: string }> = {
	caution: { icon: '⚠', word: 'Caution' },
	warning: { icon: '⛔', word: 'Warning' },
	note: { icon: 'ℹ', word: 'Note' }
};

const md = new MarkdownIt('default', { html: false, linkify: true, typographer: false });
md.linkify.set({ fuzzyLink: false, fuzzyEmail: false });
// Every URL is judged once, in `applyLinkPolicy`, with the author told why when it is refused;
// markdown-it's own check would blank the address silently.
md.validateLink = () => true;
md.use(calloutPlugin);

const escape = md.utils.escapeHtml;

function attr(t: Token, name: string): string | null {
	const value = t.attrGet(name);
	return value === null ? null : String(value);
}

// ---------------------------------------------------------------- URLs

type Target =
	| { kind: 'asset'; ref: string }
	| { kind: 'web' }
	| { kind: 'relative' }
	| { kind: 'refused'; reason: string };

const SCHEME = /^([a-z][a-z0-9+.-]*):/;

function safeDecode(value: string): string {
	try {
		return decodeURIComponent(value);
	} catch {
		return value;
	}
}

/** Browsers ignore control characters and whitespace inside a scheme; so does this check. */
function compact(value: string): string {
	// eslint-disable-next-line no-control-regex
	return value.replace(/[\u0000-\u0020\u007f-\u009f]/g, '').toLowerCase();
}

function classifyUrl(href: string): Target {
	const raw = compact(href);
	if (raw === '') return { kind: 'refused', reason: 'it has no address' };
	if (raw.startsWith('asset:')) return { kind: 'asset', ref: safeDecode(href.trim().slice(6)) };
	for (const candidate of [raw, compact(safeDecode(href))]) {
		const scheme = SCHEME.exec(candidate)?.[1];
		if (scheme && scheme !== 'http' && scheme !== 'https') {
			return { kind: 'refused', reason: `${scheme}: addresses are not allowed` };
		}
	}
	if (SCHEME.test(raw)) return { kind: 'web' };
	if (raw.startsWith('//') || raw.startsWith('\\') || raw.startsWith('/\\')) {
		return { kind: 'refused', reason: 'write the full https:// address' };
	}
	return { kind: 'relative' };
}

/** Only same-origin paths: the CSP allows images from this site alone. */
function resolveAssetUrl(env: RenderEnv, ref: string): string | null {
	if (ref === '' || !env.resolveAsset) return null;
	const url = env.resolveAsset(ref);
	if (typeof url !== 'string' || !url.startsWith('/') || /^\/[/\\]/.test(url)) return null;
	return url;
}

function useAsset(env: RenderEnv, ref: string) {
	if (ref !== '' && !env.assets.includes(ref)) env.assets.push(ref);
}

function shorten(value: string): string {
	return value.length > 80 ? `${value.slice(0, 77)}…` : value;
}

// ---------------------------------------------------------------- the token walk

function inlineText(tokens: Token[] | null): string {
	let text = '';
	for (const t of tokens ?? []) {
		if (t.type === 'text' || t.type === 'code_inline') text += t.content;
		else if (t.type === 'softbreak' || t.type === 'hardbreak') text += ' ';
		else if (t.type === 'image') {
			text += inlineText(t.children);
			const title = attr(t, 'title');
			if (title) text += ` ${title}`;
		}
	}
	return text.replace(/\s+/g, ' ').trim();
}

function slugify(text: string): string {
	const slug = text
		.normalize('NFKD')
		.replace(/\p{M}/gu, '')
		.toLowerCase()
		.replace(/[^\p{L}\p{N}]+/gu, '-')
		.replace(/^-+|-+$/g, '')
		.slice(0, 64)
		.replace(/-+$/, '');
	return slug === '' ? 'section' : slug;
}

function warn(env: RenderEnv, token: Token | undefined, message: string) {
	const line = token?.map ? token.map[0] + 1 : 0;
	env.problems.push({ line, message: line ? `Line ${line}: ${message}` : message });
}

/** Links that may not be followed keep their text, as a span, and the author gets a warning. */
function refuseLink(children: Token[], index: number) {
	for (let j = index; j < children.length; j++) {
		const t = children[j];
		if (j > index && t.type !== 'link_close') continue;
		t.tag = 'span';
		t.attrs = null;
		if (j === index) t.attrSet('class', 'link-refused');
		else break;
	}
}

function applyLinkPolicy(inline: Token, env: RenderEnv) {
	const children = inline.children ?? [];
	children.forEach((t, index) => {
		if (t.type === 'link_open') {
			const href = attr(t, 'href') ?? '';
			const target = classifyUrl(href);
			if (target.kind === 'web') {
				t.attrSet('rel', 'noopener noreferrer');
			} else if (target.kind === 'asset') {
				useAsset(env, target.ref);
				const url = resolveAssetUrl(env, target.ref);
				if (url) t.attrSet('href', url);
				else {
					warn(
						env,
						inline,
						`the link to "${shorten(target.ref)}" is not shown as a link: no file of that name is uploaded to this revision`
					);
					refuseLink(children, index);
				}
			} else if (target.kind === 'refused') {
				warn(env, inline, `the link "${shorten(href)}" is not shown as a link: ${target.reason}`);
				refuseLink(children, index);
			}
		} else if (t.type === 'image') {
			const src = attr(t, 'src') ?? '';
			const target = classifyUrl(src);
			const meta: ImageMeta = { url: null, reason: '', figure: false };
			if (target.kind === 'asset') {
				useAsset(env, target.ref);
				meta.url = resolveAssetUrl(env, target.ref);
				if (!meta.url) {
					meta.reason = `no uploaded file "${shorten(target.ref)}"`;
					warn(
						env,
						inline,
						`image "${shorten(target.ref)}" is not uploaded to this revision; its alt text is shown instead`
					);
				}
			} else {
				meta.reason = 'not an uploaded file';
				warn(
					env,
					inline,
					`image "${shorten(src)}" is not shown: images must be files uploaded to the revision, written asset:<file name>`
				);
			}
			env.images.set(t, meta);
		}
	});
}

/** A paragraph holding nothing but one image with a title becomes a figure with that caption. */
function makeFigure(tokens: Token[], i: number, env: RenderEnv) {
	const before = tokens[i - 1];
	const after = tokens[i + 1];
	if (before?.type !== 'paragraph_open' || after?.type !== 'paragraph_close') return;
	const content = (tokens[i].children ?? []).filter(
		(t) => !(t.type === 'softbreak' || (t.type === 'text' && t.content.trim() === ''))
	);
	const image = content[0];
	if (content.length !== 1 || image.type !== 'image' || !attr(image, 'title')) return;
	for (const t of [before, after]) {
		t.tag = 'figure';
		t.hidden = false;
	}
	before.attrSet('class', 'figure');
	const meta = env.images.get(image);
	if (meta) meta.figure = true;
}

function annotateFence(t: Token, env: RenderEnv, text: string[]) {
	const [lang = '', calcId = ''] = t.info.trim().split(/\s+/);
	if (lang.toLowerCase() !== 'calc') {
		const grammar = resolveLanguage(lang);
		if (grammar === null) {
			warn(
				env,
				t,
				`code language "${shorten(lang)}" is not highlighted (highlighted: ${HIGHLIGHTED_LANGUAGES.join(', ')}); shown as plain text`
			);
		}
		env.fences.set(t, { kind: 'code', grammar });
		text.push(t.content);
		return;
	}
	if (!isCalculatorId(calcId)) {
		warn(
			env,
			t,
			calcId === ''
				? `calculator block without a calculator id; write \`\`\`calc <id>, one of ${calculatorIds.join(', ')}`
				: `unknown calculator "${shorten(calcId)}"; use one of ${calculatorIds.join(', ')}`
		);
		env.fences.set(t, { kind: 'calc-unknown', id: calcId });
		return;
	}
	const fenceLine = t.map ? t.map[0] + 1 : 0;
	const parsed = parseCalcPresets(calcId, t.content, fenceLine + 1);
	for (const message of parsed.warnings) env.problems.push({ line: fenceLine, message });
	env.calculators.push({ id: calcId, presets: parsed.presets });
	env.fences.set(t, { kind: 'calc', id: calcId, presets: parsed.presets });
	text.push(`Calculator: ${calculators[calcId].title}`);
}

interface Collected {
	text: string;
	headings: RenderedInstruction['headings'];
	steps: string[];
}

interface ItemFrame {
	ordered: boolean;
	/** Index into steps, reserved when the item opens so that steps keep document order. */
	step: number;
	parts: string[];
}

function annotate(tokens: Token[], env: RenderEnv): Collected {
	const headings: Collected['headings'] = [];
	const steps: string[] = [];
	const text: string[] = [];
	const ids = new Set<string>();
	const lists: { ordered: boolean; next: number }[] = [];
	const items: ItemFrame[] = [];

	tokens.forEach((t, i) => {
		switch (t.type) {
			case 'heading_open': {
				const title = inlineText(tokens[i + 1]?.children ?? null);
				const base = slugify(title);
				let id = base;
				for (let n = 2; ids.has(id); n++) id = `${base}-${n}`;
				ids.add(id);
				t.attrSet('id', id);
				headings.push({ level: Number(t.tag.slice(1)), text: title, id });
				break;
			}
			case 'ordered_list_open': {
				const isSteps = lists.length === 0;
				if (isSteps) t.attrJoin('class', 'steps');
				lists.push({ ordered: true, next: isSteps ? Number(attr(t, 'start') ?? 1) : 0 });
				break;
			}
			case 'bullet_list_open':
				lists.push({ ordered: false, next: 0 });
				break;
			case 'ordered_list_close':
			case 'bullet_list_close':
				lists.pop();
				break;
			case 'list_item_open': {
				const list = lists.at(-1);
				const ordered = list?.ordered ?? false;
				if (list?.next) t.attrSet('data-step', String(list.next++));
				items.push({ ordered, step: ordered ? steps.push('') - 1 : -1, parts: [] });
				break;
			}
			case 'list_item_close': {
				const frame = items.pop();
				if (!frame) break;
				const joined = frame.parts.join(' ').trim();
				if (frame.ordered) steps[frame.step] = joined;
				else items.at(-1)?.parts.push(joined);
				break;
			}
			case 'inline': {
				applyLinkPolicy(t, env);
				makeFigure(tokens, i, env);
				const line = inlineText(t.children);
				text.push(line);
				items.at(-1)?.parts.push(line);
				break;
			}
			case 'fence':
				annotateFence(t, env, text);
				break;
			case 'code_block':
				text.push(t.content);
				break;
			case 'callout_open': {
				const meta = env.callouts?.get(t);
				if (meta) text.push(`${CALLOUT_WORDS[meta.kind].word} ${meta.title}`.trim());
				break;
			}
			case 'th_open':
			case 'td_open': {
				const align = /text-align:\s*(left|center|right)/.exec(attr(t, 'style') ?? '')?.[1];
				t.attrs = null;
				if (align) t.attrSet('class', `align-${align}`);
				break;
			}
		}
	});

	return {
		text: text
			.map((s) => s.trim())
			.filter(Boolean)
			.join('\n'),
		headings,
		steps: steps.filter(Boolean)
	};
}

// ---------------------------------------------------------------- renderer rules

md.renderer.rules.image = (tokens, idx, _options, env) => {
	const t = tokens[idx];
	const meta = (env as RenderEnv).images.get(t) ?? {
		url: null,
		reason: 'not checked',
		figure: false
	};
	const alt = inlineText(t.children);
	const title = attr(t, 'title') ?? '';
	let html: string;
	if (meta.url) {
		const titleAttr = title && !meta.figure ? ` title="${escape(title)}"` : '';
		html = `<img src="${escape(meta.url)}" alt="${escape(alt)}"${titleAttr} loading="lazy" decoding="async">`;
	} else {
		const label = alt ? ` · ${escape(alt)}` : '';
		html = `<span class="image-missing"><span aria-hidden="true">⚠</span> Image not shown (${escape(meta.reason)})${label}</span>`;
	}
	return meta.figure ? `${html}<figcaption>${escape(title)}</figcaption>` : html;
};

md.renderer.rules.table_open = () => '<div class="table-wrap"><table>\n';
md.renderer.rules.table_close = () => '</table></div>\n';

md.renderer.rules.callout_open = (tokens, idx, _options, env) => {
	const { kind, title } = (env as RenderEnv).callouts?.get(tokens[idx]) ?? {
		kind: 'note',
		title: ''
	};
	const { icon, word } = CALLOUT_WORDS[kind];
	const heading = title ? ` — ${escape(title)}` : '';
	return `<div class="callout callout-${kind}" role="note"><p class="callout-title"><span class="callout-icon" aria-hidden="true">${icon}</span><span class="callout-word">${word}</span>${heading}</p>\n`;
};
md.renderer.rules.callout_close = () => '</div>\n';

function renderCalcBlock(id: CalculatorId, presets: Record<string, string>): string {
	const def = calculators[id];
	const query = new URLSearchParams(presets).toString();
	const href = `/calculators/${id}${query ? `?${query}` : ''}`;
	const rows = Object.entries(presets)
		.map(([key, value]) => {
			const input = def.inputs.find((d) => d.name === key);
			return `<tr><th scope="row">${escape(input?.label ?? key)}</th><td>${escape(describePreset(id, key, value))}</td></tr>`;
		})
		.join('');
	const table = rows
		? `<table class="calc-presets"><thead><tr><th>Input</th><th>Preset</th></tr></thead><tbody>${rows}</tbody></table>`
		: '';
	return (
		`<div class="calc-block" data-calc="${id}" data-presets="${escape(JSON.stringify(presets))}">` +
		`<div class="calc-fallback"><p class="calc-fallback-title">Calculator: ${escape(def.title)}</p>${table}` +
		`<p class="calc-fallback-link"><a href="${escape(href)}">Open in the calculator</a></p>` +
		`<p class="calc-fallback-note">${escape(CALCULATOR_CAUTION)}</p></div></div>\n`
	);
}

md.renderer.rules.fence = (tokens, idx, _options, rawEnv) => {
	const env = rawEnv as RenderEnv;
	const t = tokens[idx];
	const meta = env.fences.get(t) ?? { kind: 'code', grammar: null };
	if (meta.kind === 'calc') return renderCalcBlock(meta.id, meta.presets);
	if (meta.kind === 'calc-unknown') {
		const what = meta.id
			? `There is no calculator called “${escape(shorten(meta.id))}”.`
			: 'The block names no calculator.';
		return `<div class="render-problem" role="note"><p><span class="problem-icon" aria-hidden="true">⛔</span> <strong>Calculator block not shown.</strong> ${what} Known calculators: ${calculatorIds.join(', ')}.</p></div>\n`;
	}
	return `${highlightCode(env.highlighter, t.content, meta.grammar ?? 'text')}\n`;
};

// ---------------------------------------------------------------- entry point

/** Renders an instruction's Markdown to sanitised HTML, with the facts search and checks need. */
export async function renderInstruction(
	source: string,
	opts: RenderOptions = {}
): Promise<RenderedInstruction> {
	const env: RenderEnv = {
		highlighter: await getHighlighter(),
		resolveAsset: opts.resolveAsset,
		problems: [],
		assets: [],
		calculators: [],
		images: new WeakMap(),
		fences: new WeakMap()
	};
	const tokens = md.parse(source, env);
	const collected = annotate(tokens, env);
	const html = sanitizeInstructionHtml(md.renderer.render(tokens, md.options, env));
	for (const [line, message] of env.calloutWarnings ?? []) {
		env.problems.push({ line: line + 1, message });
	}
	const warnings = env.problems.sort((a, b) => a.line - b.line).map((p) => p.message);
	return {
		html,
		...collected,
		calculators: env.calculators,
		assets: env.assets,
		warnings: [...new Set(warnings)]
	};
}
