// TEMPORARY stand-in for the instruction renderer (replaced by the Markdown pipeline at merge).
// Same interface: Markdown → sanitised HTML plus the parts other modules index and check.
import MarkdownIt from 'markdown-it';
import sanitizeHtml from 'sanitize-html';

export interface RenderOptions {
	/** Maps `asset:name.jpg` to a URL, or null when no such file belongs to the revision. */
	resolveAsset?: (ref: string) => string | null;
}

export interface RenderedInstruction {
	html: string;
	text: string;
	headings: { level: number; text: string; id: string }[];
	steps: string[];
	calculators: { id: string; presets: Record<string, string> }[];
	assets: string[];
	warnings: string[];
}

const md = new MarkdownIt({ html: false, linkify: false, typographer: false });

const defaultFence = md.renderer.rules.fence!;
md.renderer.rules.fence = (toks, idx, opts, e, self) => {
	const t = toks[idx];
	if (!t.info.trim().startsWith('calc')) return defaultFence(toks, idx, opts, e, self);
	const id = md.utils.escapeHtml(t.info.trim().slice(4).trim());
	return `<div class="calc-block" data-calc="${id}"><p><strong>Calculator: ${id}</strong></p><pre>${md.utils.escapeHtml(t.content)}</pre></div>`;
};

const slug = (s: string) =>
	s
		.toLowerCase()
		.replace(/[^\p{L}\p{N}]+/gu, '-')
		.replace(/^-|-$/g, '');

/** Renders instruction Markdown on the server; no raw HTML from the author survives. */
export async function renderInstruction(
	source: string,
	options: RenderOptions = {}
): Promise<RenderedInstruction> {
	const env = {};
	const tokens = md.parse(source, env);
	const headings: RenderedInstruction['headings'] = [];
	const steps: string[] = [];
	const calculators: RenderedInstruction['calculators'] = [];
	const assets: string[] = [];
	const warnings: string[] = [];
	let inOrdered = 0;
	for (let i = 0; i < tokens.length; i++) {
		const t = tokens[i];
		if (t.type === 'heading_open') {
			const text = tokens[i + 1]?.content ?? '';
			const id = slug(text);
			t.attrSet('id', id);
			headings.push({ level: Number(t.tag.slice(1)), text, id });
		}
		if (t.type === 'ordered_list_open') inOrdered++;
		if (t.type === 'ordered_list_close') inOrdered--;
		if (inOrdered && t.type === 'inline' && tokens[i - 2]?.type === 'list_item_open') {
			steps.push(t.content);
		}
		if (t.type === 'fence' && t.info.trim().startsWith('calc')) {
			const id = t.info.trim().slice(4).trim();
			const presets: Record<string, string> = {};
			for (const line of t.content.split('\n')) {
				const m = /^\s*([\w-]+)\s*:\s*(.+?)\s*$/.exec(line);
				if (m) presets[m[1]] = m[2];
			}
			calculators.push({ id, presets });
		}
		if (t.type === 'inline') {
			for (const c of t.children ?? []) {
				if (c.type !== 'image') continue;
				const src = String(c.attrGet('src') ?? '');
				if (!src.startsWith('asset:')) continue;
				const ref = src.slice('asset:'.length);
				assets.push(ref);
				const url = options.resolveAsset?.(ref) ?? null;
				if (url) c.attrSet('src', url);
				else {
					warnings.push(`Image "${ref}" is not a file of this revision.`);
					c.attrSet('src', '');
				}
			}
		}
	}
	const raw = md.renderer.render(tokens, md.options, env);
	const html = sanitizeHtml(raw, {
		allowedTags: [
			'h1',
			'h2',
			'h3',
			'h4',
			'p',
			'ul',
			'ol',
			'li',
			'strong',
			'em',
			'code',
			'pre',
			'blockquote',
			'table',
			'thead',
			'tbody',
			'tr',
			'th',
			'td',
			'a',
			'img',
			'hr',
			'br',
			'div',
			'span',
			'figure',
			'figcaption',
			'del',
			's'
		],
		allowedAttributes: {
			a: ['href', 'title'],
			img: ['src', 'alt', 'title'],
			h1: ['id'],
			h2: ['id'],
			h3: ['id'],
			h4: ['id'],
			div: ['class', 'data-calc'],
			th: ['style'],
			td: ['style'],
			ol: ['start'],
			code: ['class']
		},
		allowedStyles: {
			th: { 'text-align': [/^(left|right|center)$/] },
			td: { 'text-align': [/^(left|right|center)$/] }
		},
		allowedSchemes: ['http', 'https', 'mailto'],
		allowedSchemesByTag: { img: [] },
		allowProtocolRelative: false,
		transformTags: { a: sanitizeHtml.simpleTransform('a', { rel: 'noopener noreferrer' }) }
	});
	const text = sanitizeHtml(html, { allowedTags: [], allowedAttributes: {} })
		.replace(/&amp;/g, '&')
		.replace(/&lt;/g, '<')
		.replace(/&gt;/g, '>')
		.replace(/&quot;/g, '"')
		.replace(/&#39;/g, "'")
		.replace(/\s+/g, ' ')
		.trim();
	return { html, text, headings, steps, calculators, assets, warnings };
}
