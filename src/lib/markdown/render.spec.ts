import { describe, expect, it } from 'vitest';
import { calculatorIds } from '../calculators/registry';
import { renderInstruction, type RenderOptions } from './render';

const ASSETS: Record<string, string> = {
	'photo-1.jpg': '/files/rev-7/photo-1.jpg',
	'good.png': '/files/rev-7/good.png',
	'datasheet.pdf': '/files/rev-7/datasheet.pdf'
};
const resolveAsset = (ref: string) => ASSETS[ref] ?? null;
const render = (source: string, opts: RenderOptions = { resolveAsset }) =>
	renderInstruction(source, opts);

function decodeEntities(text: string): string {
	return text
		.replace(/&#x([0-9a-f]+);/gi, (_, hex: string) => String.fromCodePoint(parseInt(hex, 16)))
		.replace(/&#(\d+);/g, (_, dec: string) => String.fromCodePoint(Number(dec)))
		.replace(/&quot;/g, '"')
		.replace(/&lt;/g, '<')
		.replace(/&gt;/g, '>')
		.replace(/&amp;/g, '&');
}

/** What a reader sees: the HTML without its tags, entities decoded. */
function visibleText(html: string): string {
	return decodeEntities(html.replace(/<[^>]*>/g, ''));
}

interface Tag {
	name: string;
	attrs: Record<string, string>;
}

/** Every start tag with its attributes (the sanitiser always writes values in double quotes). */
function tagsOf(html: string): Tag[] {
	const tags: Tag[] = [];
	for (const match of html.matchAll(
		/<([a-zA-Z][a-zA-Z0-9-]*)((?:\s+[^\s=>/]+(?:="[^"]*")?)*)\s*\/?>/g
	)) {
		const attrs: Record<string, string> = {};
		for (const a of match[2].matchAll(/\s+([^\s=>/]+)(?:="([^"]*)")?/g)) {
			attrs[a[1].toLowerCase()] = decodeEntities(a[2] ?? '');
		}
		tags.push({ name: match[1].toLowerCase(), attrs });
	}
	return tags;
}

const ALLOWED_TAGS = new Set(
	'h1 h2 h3 h4 h5 h6 p br hr strong em s code pre span blockquote ul ol li a img figure figcaption div table thead tbody tr th td'.split(
		' '
	)
);
const DANGEROUS_SCHEME = /^(javascript|data|vbscript|file):/;

/** Fails the test on anything a browser could execute or load from elsewhere. */
function expectNoExecutableVector(html: string) {
	expect(html).not.toMatch(/<\s*(script|iframe|object|embed|style|svg|math|base|link|meta|form)/i);
	// Every "<" in the output opens one of our tags; text has it as &lt;.
	const opened = (html.match(/</g) ?? []).length;
	const closes = (html.match(/<\//g) ?? []).length;
	const tags = tagsOf(html);
	expect(tags.length).toBe(opened - closes);
	for (const tag of tags) {
		expect(ALLOWED_TAGS, `tag <${tag.name}>`).toContain(tag.name);
		for (const [name, value] of Object.entries(tag.attrs)) {
			expect(name, `attribute ${name} on <${tag.name}>`).not.toMatch(/^on/);
			expect(name).not.toBe('style');
			expect(name).not.toBe('srcdoc');
			if (name === 'href' || name === 'src') {
				// eslint-disable-next-line no-control-regex
				const compacted = value.replace(/[\u0000-\u0020]/g, '').toLowerCase();
				expect(compacted, `${name}="${value}"`).not.toMatch(DANGEROUS_SCHEME);
				expect(compacted).not.toMatch(/^\/\//);
				if (name === 'src') expect(compacted).toMatch(/^\/[^/\\]/);
			}
		}
	}
}

describe('headings', () => {
	it('gives every heading a unique id and lists them', async () => {
		const r = await render(
			'## Main bond\n\n### Main bond\n\n## Main bond\n\n## Kiểm tra vết ép\n\n## 检查'
		);
		expect(r.headings).toEqual([
			{ level: 2, text: 'Main bond', id: 'main-bond' },
			{ level: 3, text: 'Main bond', id: 'main-bond-2' },
			{ level: 2, text: 'Main bond', id: 'main-bond-3' },
			{ level: 2, text: 'Kiểm tra vết ép', id: 'kiem-tra-vet-ep' },
			{ level: 2, text: '检查', id: '检查' }
		]);
		expect(r.html).toContain('<h2 id="main-bond">Main bond</h2>');
		expect(r.html).toContain('<h3 id="main-bond-2">');
	});

	it('gives a heading of symbols only a fallback id', async () => {
		const r = await render('## ***\n\n## ---x');
		expect(r.headings.map((h) => h.id)).toEqual(['section', 'x']);
	});
});

describe('numbered steps', () => {
	it('marks top-level numbered lists as steps and collects their text', async () => {
		const r = await render(
			'1. Wipe the pads with IPA.\n   - lint-free wipe only\n2. Load the FPC.\n   1. Tail first.\n3. Press **both** start buttons.'
		);
		expect(r.html).toContain('<ol class="steps">');
		expect(r.html).toContain('<li data-step="1">');
		expect(r.html).toContain('<li data-step="3">');
		// The nested list is a plain numbered list, numbered by the browser.
		expect(r.html).toMatch(/<ol>\s*<li>Tail first/);
		expect(r.steps).toEqual([
			'Wipe the pads with IPA. lint-free wipe only',
			'Load the FPC.',
			'Tail first.',
			'Press both start buttons.'
		]);
	});

	it('keeps the start number of a list that continues', async () => {
		const r = await render('5. Fifth\n6. Sixth');
		expect(r.html).toContain('<ol start="5" class="steps">');
		expect(r.html).toContain('<li data-step="5">Fifth</li>');
		expect(r.html).toContain('<li data-step="6">Sixth</li>');
	});

	it('does not count bullet lists as steps', async () => {
		const r = await render('- one\n- two');
		expect(r.steps).toEqual([]);
		expect(r.html).not.toContain('steps');
	});
});

describe('tables', () => {
	it('renders a scrollable table with alignment as classes, not styles', async () => {
		const r = await render('| Param | Value |\n| :-- | --: |\n| Temp | 185 °C |');
		expect(r.html).toContain('<div class="table-wrap"><table>');
		expect(r.html).toContain('<th class="align-left">Param</th>');
		expect(r.html).toContain('<td class="align-right">185 °C</td>');
		expect(r.html).not.toContain('style=');
		expect(r.text).toContain('185 °C');
	});
});

describe('images and attachments', () => {
	it('turns an image alone in a paragraph with a title into a figure with a caption', async () => {
		const r = await render('![Even marks](asset:photo-1.jpg "Accept: even marks")');
		expect(r.html).toContain(
			'<figure class="figure"><img src="/files/rev-7/photo-1.jpg" alt="Even marks" loading="lazy" decoding="async" /><figcaption>Accept: even marks</figcaption></figure>'
		);
		expect(r.assets).toEqual(['photo-1.jpg']);
		expect(r.warnings).toEqual([]);
		expect(r.text).toContain('Even marks Accept: even marks');
	});

	it('keeps an image inside text inline, with its title as a tooltip', async () => {
		const r = await render('See ![mark](asset:good.png "Good") here.');
		expect(r.html).toContain(
			'<p>See <img src="/files/rev-7/good.png" alt="mark" title="Good" loading="lazy" decoding="async" /> here.</p>'
		);
		expect(r.html).not.toContain('<figure');
	});

	it('does not make a figure from an image without a title', async () => {
		const r = await render('![mark](asset:good.png)');
		expect(r.html).toContain('<p><img src="/files/rev-7/good.png" alt="mark"');
	});

	it('shows the alt text and warns when an uploaded file is missing', async () => {
		const r = await render('![Weak edge](asset:missing.jpg "Reject")');
		expect(r.html).not.toContain('<img');
		expect(visibleText(r.html)).toContain('Weak edge');
		expect(r.html).toContain('<figcaption>Reject</figcaption>');
		expect(r.warnings).toEqual([
			'Line 1: image "missing.jpg" is not uploaded to this revision; its alt text is shown instead'
		]);
		expect(r.assets).toEqual(['missing.jpg']);
	});

	it('treats every ref as missing when no resolver is given', async () => {
		const r = await render('![x](asset:photo-1.jpg)', {});
		expect(r.html).not.toContain('<img');
		expect(r.warnings).toHaveLength(1);
	});

	it('refuses external and relative image addresses (the CSP allows our own files only)', async () => {
		const r = await render(
			'![a](https://images.example/a.png) ![b](/static/b.png) ![c](photo-1.jpg)'
		);
		expect(r.html).not.toContain('<img');
		expect(visibleText(r.html)).toMatch(/a.*b.*c/);
		expect(r.warnings).toHaveLength(3);
		expect(r.warnings[0]).toContain('images must be files uploaded to the revision');
	});

	it('refuses a resolver answer that is not a same-site path', async () => {
		for (const url of [
			'https://cdn.example/x.png',
			'//cdn.example/x.png',
			'/\\cdn.example',
			'x.png'
		]) {
			const r = await render('![x](asset:a.png)', { resolveAsset: () => url });
			expect(r.html, url).not.toContain('<img');
			expect(r.warnings).toHaveLength(1);
		}
	});

	it('links attachments through the resolver and lists each ref once', async () => {
		const r = await render(
			'[Data sheet](asset:datasheet.pdf), again [here](asset:datasheet.pdf) and ![p](asset:photo-1.jpg)'
		);
		expect(r.html).toContain('<a href="/files/rev-7/datasheet.pdf">Data sheet</a>');
		expect(r.assets).toEqual(['datasheet.pdf', 'photo-1.jpg']);
	});

	it('keeps the text of a link to a missing attachment and warns', async () => {
		const r = await render('[Data sheet](asset:old.pdf)');
		expect(r.html).toContain('<span class="link-refused">Data sheet</span>');
		expect(r.warnings[0]).toContain('"old.pdf" is not shown as a link');
	});

	it('decodes percent-encoded file names', async () => {
		const r = await render('![x](<asset:ảnh 1.jpg>)', {
			resolveAsset: (ref) => (ref === 'ảnh 1.jpg' ? '/files/anh-1.jpg' : null)
		});
		expect(r.assets).toEqual(['ảnh 1.jpg']);
		expect(r.html).toContain('src="/files/anh-1.jpg"');
	});
});

describe('links', () => {
	it('allows http(s) links with rel=noopener and relative links as they are', async () => {
		const r = await render(
			'[maker](https://maker.example/acf) [calc](/calculators/bond-force) [up](../x) [anchor](#main-bond) https://auto.example/page'
		);
		expect(r.html).toContain(
			'<a href="https://maker.example/acf" rel="noopener noreferrer">maker</a>'
		);
		expect(r.html).toContain('<a href="/calculators/bond-force">calc</a>');
		expect(r.html).toContain('<a href="../x">up</a>');
		expect(r.html).toContain('<a href="#main-bond">anchor</a>');
		expect(r.html).toContain('<a href="https://auto.example/page" rel="noopener noreferrer">');
		expect(r.warnings).toEqual([]);
	});

	it('does not link file names or e-mail addresses by guesswork', async () => {
		const r = await render('See recipe.sh and lead.l1@kbo2.example');
		expect(r.html).not.toContain('<a');
	});

	it('refuses other schemes with a warning and keeps the text', async () => {
		const r = await render(
			'[mail](mailto:x@kbo2.example) [share](file:///c:/x) [proto](//evil.example)'
		);
		expect(r.html).not.toContain('<a');
		expect(visibleText(r.html)).toBe('mail share proto\n');
		expect(r.warnings).toEqual([
			'Line 1: the link "mailto:x@kbo2.example" is not shown as a link: mailto: addresses are not allowed',
			'Line 1: the link "file:///c:/x" is not shown as a link: file: addresses are not allowed',
			'Line 1: the link "//evil.example" is not shown as a link: write the full https:// address'
		]);
	});
});

describe('caution, warning and note blocks', () => {
	it('renders each kind with its icon, word and title', async () => {
		const r = await render(
			':::caution Hot head\nThe head runs at **185 °C**.\n:::\n\n:::warning\nPinch point.\n:::\n\n:::note Tip\nUse the fork.\n:::'
		);
		expect(r.html).toContain(
			'<div class="callout callout-caution" role="note"><p class="callout-title"><span class="callout-icon" aria-hidden="true">⚠</span><span class="callout-word">Caution</span> — Hot head</p>\n<p>The head runs at <strong>185 °C</strong>.</p>\n</div>'
		);
		expect(r.html).toContain(
			'<div class="callout callout-warning" role="note"><p class="callout-title"><span class="callout-icon" aria-hidden="true">⛔</span><span class="callout-word">Warning</span></p>'
		);
		expect(r.html).toContain(
			'<span class="callout-icon" aria-hidden="true">ℹ</span><span class="callout-word">Note</span> — Tip'
		);
		expect(r.warnings).toEqual([]);
		expect(r.text).toContain('Caution Hot head');
	});

	it('holds any Markdown, interrupts a paragraph and nests', async () => {
		const r = await render(
			'Before the step:\n:::Caution ESD\n1. Test the strap.\n\n:::note\nInner\n:::\n\nAfter inner.\n:::\nOutside.'
		);
		expect(r.html).toMatch(/<p>Before the step:<\/p>\s*<div class="callout callout-caution"/);
		expect(r.html).toContain('<ol class="steps">');
		expect(r.html).toMatch(
			/callout-note[\s\S]*Inner[\s\S]*<\/div>\s*<p>After inner.<\/p>\s*<\/div>\s*<p>Outside.<\/p>/
		);
		expect(r.warnings).toEqual([]);
	});

	it('works inside a list item', async () => {
		const r = await render('1. Step one\n\n   :::caution\n   Hot.\n   :::\n2. Step two');
		expect(r.html).toMatch(/<li data-step="1">[\s\S]*callout-caution[\s\S]*Hot\.[\s\S]*<\/li>/);
		expect(r.steps).toEqual(['Step one Hot.', 'Step two']);
	});

	it('warns about a block that is never closed, and keeps its content', async () => {
		const r = await render('Intro\n\n:::warning Fumes\nStop the head.');
		expect(r.html).toContain('callout-warning');
		expect(r.html).toContain('Stop the head.');
		expect(r.warnings).toEqual([
			'Line 3: the :::warning block has no closing ":::" line; it runs to the end'
		]);
	});

	it('leaves an unknown kind as text and says which kinds exist', async () => {
		const r = await render(':::danger Hot\ntext\n:::');
		expect(r.html).not.toContain('callout');
		expect(visibleText(r.html)).toContain(':::danger Hot');
		expect(r.warnings).toEqual([
			'Line 1: ":::danger" is not a block type; use :::caution, :::warning or :::note'
		]);
	});

	it('does not treat ::: inside a code block as a block', async () => {
		const r = await render('```text\n:::caution\n:::\n```');
		expect(r.html).not.toContain('callout');
		expect(r.warnings).toEqual([]);
	});
});

describe('code blocks', () => {
	it('highlights recipe files with token classes and no inline styles', async () => {
		const r = await render('```ini\n; FOG-7IN-B\n[main_bond]\nhead_temp_c = 185\n```');
		expect(r.html).toContain('<pre class="shiki padbridge lang-ini" tabindex="0"><code>');
		expect(r.html).toContain('<span class="tok-comment">; FOG-7IN-B</span>');
		expect(r.html).toContain('<span class="tok-keyword">head_temp_c</span>');
		expect(r.html).not.toContain('style=');
		expect(r.text).toContain('head_temp_c = 185');
	});

	it.each([
		['yaml', 'force_n: 72', 'lang-yaml'],
		['yml', 'force_n: 72', 'lang-yaml'],
		['json', '{"force_n": 72}', 'lang-json'],
		['csv', 'step,temp_c\n1,185', 'lang-csv'],
		['shell', 'echo "$RECIPE"', 'lang-shellscript'],
		['bash', 'ls -l', 'lang-shellscript'],
		['text', 'plain words', 'lang-text'],
		['', 'no language', 'lang-text']
	])('highlights ```%s', async (lang, code, cls) => {
		const r = await render(`\`\`\`${lang}\n${code}\n\`\`\``);
		expect(r.html).toContain(`class="shiki padbridge ${cls}"`);
		expect(r.warnings).toEqual([]);
		if (lang !== 'text' && lang !== '') expect(r.html).toMatch(/class="tok-[a-z-]+"/);
	});

	it('shows other languages as escaped plain text with a warning', async () => {
		const r = await render('```python\nprint("<b>")\n```');
		expect(r.html).toContain('lang-text');
		expect(visibleText(r.html)).toContain('print("<b>")');
		expect(r.html).not.toContain('<b>');
		expect(r.warnings[0]).toMatch(/^Line 1: code language "python" is not highlighted/);
	});
});

describe('calculator blocks', () => {
	it('renders a placeholder with the presets and a fallback that works without JavaScript', async () => {
		const r = await render(
			'```calc bond-force\n# the COG bumps of the 1.4" panel\nbasis: bump\nbumpCount: 1280\n\npressureMPa: 70\n```'
		);
		const presets = { basis: 'bump', bumpCount: '1280', pressureMPa: '70' };
		expect(r.calculators).toEqual([{ id: 'bond-force', presets }]);
		const block = tagsOf(r.html).find((t) => t.attrs.class === 'calc-block');
		expect(block?.attrs['data-calc']).toBe('bond-force');
		expect(JSON.parse(block?.attrs['data-presets'] ?? '')).toEqual(presets);
		expect(r.html).toContain(
			'<a href="/calculators/bond-force?basis=bump&amp;bumpCount=1280&amp;pressureMPa=70">Open in the calculator</a>'
		);
		expect(r.html).toContain('<th scope="row">Bump count</th><td>1280 pcs</td>');
		expect(r.html).toContain('<td>Total bump area (COG, COF)</td>');
		expect(r.html).toContain('validated recipe');
		expect(r.warnings).toEqual([]);
		expect(r.text).toContain('Calculator: Bond force');
	});

	it('accepts every calculator id of the registry', async () => {
		const r = await render(calculatorIds.map((id) => `\`\`\`calc ${id}\n\`\`\``).join('\n\n'));
		expect(r.calculators.map((c) => c.id)).toEqual([...calculatorIds]);
		expect(r.warnings).toEqual([]);
	});

	it('shows a visible problem for an unknown id or a missing id', async () => {
		const r = await render('```calc bond-forse\nx: 1\n```\n\n```calc\n```');
		expect(r.html).not.toContain('calc-block');
		expect(r.html).toContain('<div class="render-problem" role="note">');
		expect(visibleText(r.html)).toContain('There is no calculator called “bond-forse”');
		expect(visibleText(r.html)).toContain('The block names no calculator.');
		expect(r.calculators).toEqual([]);
		expect(r.warnings).toEqual([
			'Line 1: unknown calculator "bond-forse"; use one of bond-force, particle-capture, bridge-risk, cure-degree, pitch-compensation, head-offset, units',
			'Line 5: calculator block without a calculator id; write ```calc <id>, one of bond-force, particle-capture, bridge-risk, cure-degree, pitch-compensation, head-offset, units'
		]);
	});

	it('reports preset problems with their document line', async () => {
		const r = await render(
			'Intro\n\n```calc bond-force\nbasis: tool\npressure: 3\nbumpCount: 12\nwidthMm: wide\n```'
		);
		expect(r.warnings).toEqual([
			'Line 5 (calc bond-force): unknown input "pressure"; inputs are basis, bumpCount, bumpWidthUm, bumpLengthUm, widthMm, lengthMm, pressureMPa, forceN, cylinderBoreMm, headWeightN',
			'Line 7 (calc bond-force): Width must be a number',
			'Line 6 (calc bond-force): "bumpCount" is only used when basis is bump'
		]);
		// A bad value stays, so the live calculator shows its own error on that field.
		expect(r.calculators[0].presets).toEqual({ basis: 'tool', bumpCount: '12', widthMm: 'wide' });
	});
});

describe('plain text for search', () => {
	it('holds the words and no markup', async () => {
		const r = await render(
			'## Thaw\n\nLeave the **reel** sealed for `2 h`.\n\n1. Write the time.\n\n| a | b |\n|---|---|\n| cell |  x |'
		);
		expect(r.text).toBe('Thaw\nLeave the reel sealed for 2 h.\nWrite the time.\na\nb\ncell\nx');
	});
});

describe('warnings', () => {
	it('come in document order', async () => {
		const r = await render('![a](https://x.example/a.png)\n\n:::danger\n\n[b](javascript:1)');
		expect(r.warnings.map((w) => w.slice(0, 7))).toEqual(['Line 1:', 'Line 3:', 'Line 5:']);
	});
});

// ------------------------------------------------------------------ XSS

interface Payload {
	name: string;
	source: string;
	/** Text the reader must still see (the payload shown, not silently dropped). */
	shows?: string;
	resolve?: (ref: string) => string | null;
}

const payloads: Payload[] = [
	{ name: 'script tag', source: '<script>alert(1)</script>', shows: '<script>alert(1)</script>' },
	{
		name: 'img onerror',
		source: '<img src=x onerror=alert(1)>',
		shows: '<img src=x onerror=alert(1)>'
	},
	{ name: 'javascript: link', source: '[tap](javascript:alert(1))', shows: 'tap' },
	{ name: 'mixed-case scheme', source: '[tap](JaVaScRiPt:alert(1))', shows: 'tap' },
	{ name: 'decimal entity scheme', source: '[tap](&#106;avascript:alert(1))', shows: 'tap' },
	{ name: 'hex entity scheme', source: '[tap](&#x6A;avascript:alert(1))', shows: 'tap' },
	{ name: 'tab entity inside scheme', source: '[tap](java&#x09;script:alert(1))', shows: 'tap' },
	{ name: 'newline entity inside scheme', source: '[tap](java&#10;script:alert(1))', shows: 'tap' },
	{ name: 'percent-encoded colon', source: '[tap](javascript%3Aalert(1))', shows: 'tap' },
	{ name: 'leading spaces in a link', source: '[tap](   javascript:alert(1))', shows: 'tap' },
	{
		name: 'raw anchor with spaced javascript',
		source: '<a href="  javascript:alert(1)">tap</a>',
		shows: '<a href="  javascript:alert(1)">tap</a>'
	},
	{ name: 'autolink', source: '<javascript:alert(1)>', shows: 'javascript:alert(1)' },
	{
		name: 'reference link',
		source: '[tap][evil]\n\n[evil]: javascript:alert(1)',
		shows: 'tap'
	},
	{
		name: 'data: html link',
		source: '[tap](data:text/html;base64,PHNjcmlwdD5hbGVydCgxKTwvc2NyaXB0Pg==)',
		shows: 'tap'
	},
	{ name: 'upper-case data: link', source: '[tap](DATA:text/html,<b>x</b>)', shows: 'tap' },
	{ name: 'vbscript: link', source: '[tap](vbscript:msgbox(1))', shows: 'tap' },
	{
		name: 'SVG with script',
		source: '<svg onload=alert(1)><script>alert(1)</script></svg>',
		shows: '<svg onload=alert(1)>'
	},
	{
		name: 'iframe',
		source: '<iframe src="javascript:alert(1)"></iframe>',
		shows: '<iframe src="javascript:alert(1)"></iframe>'
	},
	{
		name: 'style tag',
		source: '<style>body{background:url(javascript:alert(1))}</style>',
		shows: '<style>'
	},
	{
		name: 'CSS expression',
		source: '<div style="width: expression(alert(1))">x</div>',
		shows: 'expression(alert(1))'
	},
	{ name: 'event handler attribute', source: '<p onclick="alert(1)">tap</p>', shows: 'onclick' },
	{
		name: 'nested script tags',
		source: '<scr<script>ipt>alert(1)</scr</script>ipt>',
		shows: '<scr<script>ipt>'
	},
	{
		name: 'entity-encoded script',
		source: '&lt;script&gt;alert(1)&lt;/script&gt;',
		shows: '<script>alert(1)</script>'
	},
	{ name: 'HTML comment hiding a script', source: '<!-- x --><script>alert(1)</script>' },
	{
		name: 'template syntax',
		source: "{{constructor.constructor('alert(1)')()}}",
		shows: "{{constructor.constructor('alert(1)')()}}"
	},
	{ name: 'image with javascript src', source: '![x](javascript:alert(1))', shows: 'x' },
	{
		name: 'image with data: svg',
		source: '![x](data:image/svg+xml;base64,PHN2ZyBvbmxvYWQ9YWxlcnQoMSk+)',
		shows: 'x'
	},
	{
		name: 'resolver returning javascript:',
		source: '![x](asset:a.png)',
		resolve: () => 'javascript:alert(1)',
		shows: 'x'
	},
	{
		name: 'calc block preset breaking out of the attribute',
		source:
			'```calc bond-force\nbasis: "><script>alert(1)</script>\nbumpCount: \'><img src=x onerror=alert(1)>\n```',
		shows: '"><script>alert(1)</script>'
	},
	{
		name: 'calc block key payload',
		source: '```calc units\n"><svg onload=alert(1)>: 1\n```'
	},
	{
		name: 'calc id payload',
		source: '```calc "><script>alert(1)</script>\n```',
		shows: '"><script>alert(1)</script>'
	},
	{
		name: 'heading with svg onload',
		source: '## Main bond <svg onload=alert(1)>',
		shows: 'Main bond <svg onload=alert(1)>'
	},
	{
		name: 'table cell payloads',
		source: '| a | b |\n|---|---|\n| <img src=x onerror=alert(1)> | [tap](javascript:alert(1)) |',
		shows: '<img src=x onerror=alert(1)>'
	},
	{
		name: 'caption with quotes',
		source: '![a"b](asset:good.png "Caption \\" onerror=\\"alert(1)")',
		shows: 'Caption " onerror="alert(1)'
	},
	{
		name: 'link title with quotes',
		source: '[tap](https://ok.example "a\\" onmouseover=\\"alert(1)")',
		shows: 'tap'
	},
	{
		name: 'quote inside a URL',
		source: '[tap](https://ok.example/"onmouseover="alert(1))',
		shows: 'tap'
	},
	{
		name: 'callout title payload',
		source: ':::caution <img src=x onerror=alert(1)>\nx\n:::',
		shows: '<img src=x onerror=alert(1)>'
	},
	{
		name: 'object and embed',
		source: '<object data="x.swf"></object><embed src="x.swf">',
		shows: '<embed src="x.swf">'
	},
	{
		name: 'math with xlink',
		source: '<math><mi xlink:href="javascript:alert(1)">x</mi></math>',
		shows: '<math>'
	},
	{ name: 'base tag', source: '<base href="javascript:/">', shows: '<base' },
	{ name: 'backslash host', source: '[tap](/\\evil.example)', shows: 'tap' },
	{
		name: 'code block with a script',
		source: '```json\n{"x": "</code></pre><script>alert(1)</script>"}\n```',
		shows: '</code></pre><script>alert(1)</script>'
	}
];

describe('XSS payloads execute nothing', () => {
	it('has a long list', () => {
		expect(payloads.length).toBeGreaterThanOrEqual(25);
	});

	it.each(payloads)('$name', async ({ source, shows, resolve }) => {
		const r = await render(source, { resolveAsset: resolve ?? resolveAsset });
		expectNoExecutableVector(r.html);
		if (shows) expect(visibleText(r.html)).toContain(shows);
	});

	it('the check itself catches a vector', () => {
		expect(() => expectNoExecutableVector('<p onclick="x">a</p>')).toThrow();
		expect(() => expectNoExecutableVector('<a href=" JavaScript:x">a</a>')).toThrow();
		expect(() => expectNoExecutableVector('<img src="https://evil.example/x.png">')).toThrow();
		expect(() => expectNoExecutableVector('<script>x</script>')).toThrow();
		expect(() => expectNoExecutableVector('<p>fine</p>')).not.toThrow();
	});
});
