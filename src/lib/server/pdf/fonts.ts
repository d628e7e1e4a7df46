// Text in Padbridge's PDFs (certificates, training histories): Noto Sans for Latin, Vietnamese,
// Greek and Cyrillic, Noto Sans SC for the Chinese and Japanese characters it lacks and Noto Sans
// KR for Hangul, picked per run of text.
//
// pdf-lib's own subsetting drops glyphs when rendered, and full CJK embedding makes a
// multi-megabyte file, so each font is subset with harfbuzz (subset-font) to the characters the
// document uses and embedded whole; the mark features are off so Vietnamese marks keep their
// precomposed positions (see shared STACK notes, "Fonts in PDFs").
import { readFile } from 'node:fs/promises';
import path from 'node:path';
import { StandardFonts, type PDFDocument, type PDFFont, type PDFPage, type RGB } from 'pdf-lib';
import * as fontkitModule from '@pdf-lib/fontkit';
import type { Font as FontkitFont } from '@pdf-lib/fontkit';
import subsetFont from 'subset-font';

const FONT_FILES = {
	regular: '@expo-google-fonts/noto-sans/400Regular/NotoSans_400Regular.ttf',
	bold: '@expo-google-fonts/noto-sans/700Bold/NotoSans_700Bold.ttf',
	cjk: '@expo-google-fonts/noto-sans-sc/400Regular/NotoSansSC_400Regular.ttf',
	hangul: '@expo-google-fonts/noto-sans-kr/400Regular/NotoSansKR_400Regular.ttf'
} as const;

export type FontKey = keyof typeof FONT_FILES;
export type Weight = 'regular' | 'bold';
export type Run = { text: string; font: FontKey };
// subset-font (fontverter) recognises only a Buffer, not a bare Uint8Array.
type LoadedFont = { bytes: Buffer; face: FontkitFont };
type LoadedFonts = Record<FontKey, LoadedFont>;

// The UMD build (node) exposes fontkit as the default export; the types declare named exports.
const fontkit = ((fontkitModule as unknown as { default?: typeof fontkitModule }).default ??
	fontkitModule) as typeof fontkitModule;

let fontsPromise: Promise<LoadedFonts> | undefined;

/** Reads and parses the TTFs once per process. */
function loadFonts(): Promise<LoadedFonts> {
	fontsPromise ??= (async () => {
		const entries = await Promise.all(
			(Object.keys(FONT_FILES) as FontKey[]).map(async (key) => {
				const bytes = await readFile(path.join(process.cwd(), 'node_modules', FONT_FILES[key]));
				return [key, { bytes, face: fontkit.create(bytes) }] as const;
			})
		);
		return Object.fromEntries(entries) as LoadedFonts;
	})();
	fontsPromise.catch(() => (fontsPromise = undefined));
	return fontsPromise;
}

/**
 * Splits text into runs by which font has the glyph: Noto Sans (in the wanted weight) first, then
 * Noto Sans SC, then Noto Sans KR. Those have one weight here, so bold CJK prints regular.
 */
function splitRuns(text: string, weight: Weight, fonts: LoadedFonts): Run[] {
	const runs: Run[] = [];
	for (const char of text) {
		const codePoint = char.codePointAt(0) ?? 0;
		// Spaces and punctuation stay with the current run so a name does not flip fonts mid-word.
		const neutral = /[\s\p{P}]/u.test(char) && runs.length > 0;
		const font: FontKey = neutral
			? runs[runs.length - 1].font
			: (([weight, 'cjk', 'hangul'] as const).find((key) =>
					fonts[key].face.hasGlyphForCodePoint(codePoint)
				) ?? weight);
		const last = runs[runs.length - 1];
		if (last && last.font === font) last.text += char;
		else runs.push({ text: char, font });
	}
	return runs;
}

export interface DrawOptions {
	x: number;
	y: number;
	size: number;
	weight?: Weight;
	color: RGB;
}

/**
 * The fonts of one document, embedded for exactly the text it will print. Measure and draw
 * through it, so every run of a string uses the font that has its glyphs.
 */
export class PdfFonts {
	private constructor(
		private readonly split: (text: string, weight: Weight) => Run[],
		private readonly embedded: Partial<Record<FontKey, PDFFont>>
	) {}

	/**
	 * Subsets and embeds the Noto fonts for `texts` (every string the document may print, with
	 * its weight). Text drawn later must use only characters of these strings.
	 */
	static async embed(doc: PDFDocument, texts: Iterable<[string, Weight]>): Promise<PdfFonts> {
		const fonts = await loadFonts();
		const used: Record<FontKey, Set<string>> = {
			regular: new Set(),
			bold: new Set(),
			cjk: new Set(),
			hangul: new Set()
		};
		for (const [text, weight] of texts) {
			for (const run of splitRuns(text, weight, fonts))
				for (const c of run.text) used[run.font].add(c);
		}
		doc.registerFontkit(fontkit as unknown as Parameters<PDFDocument['registerFontkit']>[0]);
		const embedded: Partial<Record<FontKey, PDFFont>> = {};
		await Promise.all(
			(Object.keys(used) as FontKey[])
				.filter((key) => used[key].size > 0)
				.map(async (key) => {
					const subset = await subsetFont(fonts[key].bytes, [...used[key]].join(''), {
						targetFormat: 'truetype'
					});
					// liga off as well: a ligature glyph (fi) loses its text in pdftotext's reading.
					embedded[key] = await doc.embedFont(new Uint8Array(subset), {
						subset: false,
						features: { ccmp: false, mark: false, mkmk: false, liga: false }
					});
				})
		);
		return new PdfFonts((text, weight) => splitRuns(text, weight, fonts), embedded);
	}

	/**
	 * pdf-lib's built-in Helvetica, no font files: the benchmark floor. Latin-1 text only
	 * (WinAnsi); never for documents people receive.
	 */
	static async standard(doc: PDFDocument): Promise<PdfFonts> {
		const embedded = {
			regular: await doc.embedFont(StandardFonts.Helvetica),
			bold: await doc.embedFont(StandardFonts.HelveticaBold)
		};
		return new PdfFonts((text, weight) => [{ text, font: weight }], embedded);
	}

	private font(key: FontKey): PDFFont {
		const f = this.embedded[key];
		if (!f) throw new Error(`font ${key} was not embedded for this text`);
		return f;
	}

	/** Width of the text in points at `size`. */
	width(text: string, size: number, weight: Weight = 'regular'): number {
		return this.split(text, weight).reduce(
			(sum, run) => sum + this.font(run.font).widthOfTextAtSize(run.text, size),
			0
		);
	}

	/** Draws the text left-aligned at (x, y) on its baseline; returns its width. */
	draw(page: PDFPage, text: string, o: DrawOptions): number {
		let x = o.x;
		for (const run of this.split(text, o.weight ?? 'regular')) {
			const font = this.font(run.font);
			page.drawText(run.text, { x, y: o.y, size: o.size, font, color: o.color });
			x += font.widthOfTextAtSize(run.text, o.size);
		}
		return x - o.x;
	}
}
