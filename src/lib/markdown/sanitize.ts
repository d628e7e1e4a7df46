import sanitizeHtml from 'sanitize-html';

/**
 * The allow-list for rendered instructions: exactly the tags, attributes and classes the renderer
 * emits. Authors cannot write HTML at all (markdown-it runs with `html: false`); this is the second
 * line, so that a renderer bug cannot put script or an event handler in front of an operator.
 */
const OPTIONS: sanitizeHtml.IOptions = {
	allowedTags: [
		'h1',
		'h2',
		'h3',
		'h4',
		'h5',
		'h6',
		'p',
		'br',
		'hr',
		'strong',
		'em',
		's',
		'code',
		'pre',
		'span',
		'blockquote',
		'ul',
		'ol',
		'li',
		'a',
		'img',
		'figure',
		'figcaption',
		'div',
		'table',
		'thead',
		'tbody',
		'tr',
		'th',
		'td'
	],
	allowedAttributes: {
		h1: ['id'],
		h2: ['id'],
		h3: ['id'],
		h4: ['id'],
		h5: ['id'],
		h6: ['id'],
		a: ['href', 'title', 'rel'],
		img: ['src', 'alt', 'title', 'loading', 'decoding'],
		ol: ['start', 'class'],
		li: ['data-step'],
		pre: ['class', 'tabindex'],
		span: ['class', 'aria-hidden'],
		div: ['class', 'role', 'data-calc', 'data-presets'],
		p: ['class'],
		figure: ['class'],
		table: ['class'],
		th: ['class', 'scope'],
		td: ['class'],
		code: ['class']
	},
	allowedClasses: {
		ol: ['steps'],
		pre: ['shiki', 'padbridge', 'lang-*'],
		span: [
			'line',
			'tok-*',
			'callout-icon',
			'callout-word',
			'image-missing',
			'link-refused',
			'problem-icon'
		],
		div: [
			'callout',
			'callout-caution',
			'callout-warning',
			'callout-note',
			'calc-block',
			'calc-fallback',
			'table-wrap',
			'render-problem'
		],
		p: ['callout-title', 'calc-fallback-title', 'calc-fallback-link', 'calc-fallback-note'],
		figure: ['figure'],
		table: ['calc-presets'],
		th: ['align-left', 'align-center', 'align-right'],
		td: ['align-left', 'align-center', 'align-right']
	},
	// Links may go anywhere on http(s) or stay relative; images only to our own files.
	allowedSchemes: ['http', 'https'],
	allowedSchemesByTag: { img: [] },
	allowedSchemesAppliedToAttributes: ['href', 'src'],
	allowProtocolRelative: false,
	allowedStyles: {},
	disallowedTagsMode: 'discard'
};

export function sanitizeInstructionHtml(html: string): string {
	return sanitizeHtml(html, OPTIONS);
}
