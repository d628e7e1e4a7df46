// The certificate as a PDF: one A4 landscape page, vector QR, fonts subset to the page's text.
//
// Fonts: pdf-lib's own subsetting drops glyphs when rendered, and full CJK embedding makes a
// multi-megabyte file, so each font is subset with harfbuzz (subset-font) to the characters this
// document uses and embedded whole; the mark features are off so Vietnamese marks keep their
// precomposed positions (see shared STACK notes, "Fonts in PDFs").
import { readFile } from 'node:fs/promises';
import path from 'node:path';
import { PDFDocument, StandardFonts, rgb, type PDFFont, type PDFPage, type RGB } from 'pdf-lib';
import * as fontkitModule from '@pdf-lib/fontkit';
import type { Font as FontkitFont } from '@pdf-lib/fontkit';
import subsetFont from 'subset-font';
import QRCode from 'qrcode';
import { formatLocal, localDate } from '../../time';

export type CertificatePdfInput = {
	number: string;
	holderName: string;
	employeeNo: string;
	processName: string;
	processCode: string;
	basisRevisions: { docNumber: string; letter: string; title: string }[];
	ruleVersion: number | string;
	issuedAt: Date;
	expiresAt: Date;
	/** IANA zone of the plant; dates print in it with the zone's name. */
	timeZone: string;
	plantName: string;
	issuer: { name: string; meaning: 'issued'; signedAt: Date };
	verifyUrl: string;
};

// These mirror the colour tokens in tailwind.config.ts (panel, film, bond); keep them in step.
const TOKEN_HEX = {
	'panel-50': '#f4f6f8',
	'panel-200': '#cbd3dc',
	'panel-500': '#55657b',
	'panel-700': '#343f50',
	'panel-900': '#161c25',
	'film-100': '#feecc7',
	'film-500': '#e5830b',
	'film-700': '#9a4609',
	'bond-700': '#1d6338'
} as const;

type Token = keyof typeof TOKEN_HEX;

function tokenRgb(token: Token): RGB {
	const hex = TOKEN_HEX[token];
	const channel = (at: number) => parseInt(hex.slice(at, at + 2), 16) / 255;
	return rgb(channel(1), channel(3), channel(5));
}

const FONT_FILES = {
	regular: '@expo-google-fonts/noto-sans/400Regular/NotoSans_400Regular.ttf',
	bold: '@expo-google-fonts/noto-sans/700Bold/NotoSans_700Bold.ttf',
	cjk: '@expo-google-fonts/noto-sans-sc/400Regular/NotoSansSC_400Regular.ttf'
} as const;

type FontKey = keyof typeof FONT_FILES;
type Weight = 'regular' | 'bold';
// subset-font (fontverter) recognises only a Buffer, not a bare Uint8Array.
type LoadedFont = { bytes: Buffer; face: FontkitFont };

// The UMD build (node) exposes fontkit as the default export; the types declare named exports.
const fontkit = ((fontkitModule as unknown as { default?: typeof fontkitModule }).default ??
	fontkitModule) as typeof fontkitModule;

let fontsPromise: Promise<Record<FontKey, LoadedFont>> | undefined;

/** Reads and parses the three TTFs once per process. */
function loadFonts(): Promise<Record<FontKey, LoadedFont>> {
	fontsPromise ??= (async () => {
		const entries = await Promise.all(
			(Object.keys(FONT_FILES) as FontKey[]).map(async (key) => {
				const bytes = await readFile(path.join(process.cwd(), 'node_modules', FONT_FILES[key]));
				return [key, { bytes, face: fontkit.create(bytes) }] as const;
			})
		);
		return Object.fromEntries(entries) as Record<FontKey, LoadedFont>;
	})();
	fontsPromise.catch(() => (fontsPromise = undefined));
	return fontsPromise;
}

type Run = { text: string; font: FontKey };

/**
 * Splits text into runs by which font has the glyph: Noto Sans (in the wanted weight) first,
 * Noto Sans SC for what it lacks. CJK has one weight here, so bold CJK prints regular.
 */
function splitRuns(text: string, weight: Weight, fonts: Record<FontKey, LoadedFont>): Run[] {
	const runs: Run[] = [];
	for (const char of text) {
		const codePoint = char.codePointAt(0) ?? 0;
		const latin: FontKey = weight;
		// Spaces and punctuation stay with the current run so a name does not flip fonts mid-word.
		const neutral = /[\s\p{P}]/u.test(char) && runs.length > 0;
		const font: FontKey = neutral
			? runs[runs.length - 1].font
			: fonts[latin].face.hasGlyphForCodePoint(codePoint) ||
				  !fonts.cjk.face.hasGlyphForCodePoint(codePoint)
				? latin
				: 'cjk';
		const last = runs[runs.length - 1];
		if (last && last.font === font) last.text += char;
		else runs.push({ text: char, font });
	}
	return runs;
}

type TextItem = {
	text: string;
	x: number;
	y: number;
	size: number;
	weight?: Weight;
	color?: Token;
	align?: 'left' | 'center';
	/** Shrinks the size until the text fits this width. */
	maxWidth?: number;
};

const PAGE_W = 841.89;
const PAGE_H = 595.28;
const MARGIN = 42;

function dateInZone(at: Date, timeZone: string): string {
	const zone = formatLocal(at, timeZone).split(' ').slice(2).join(' ');
	return `${localDate(at, timeZone)} (${timeZone}${zone ? `, ${zone}` : ''})`;
}

function utcStamp(at: Date): string {
	return `${at.toISOString().slice(0, 16).replace('T', ' ')} UTC`;
}

/** Everything printed on the page as positioned text, before fonts are chosen. */
function layoutText(input: CertificatePdfInput): TextItem[] {
	const items: TextItem[] = [];
	const left = MARGIN + 18;
	const qrColumnX = PAGE_W - MARGIN - 200;
	const textWidth = qrColumnX - left - 24;

	items.push(
		{
			text: 'PADBRIDGE',
			x: left,
			y: PAGE_H - MARGIN - 30,
			size: 13,
			weight: 'bold',
			color: 'film-100'
		},
		{
			text: input.plantName,
			x: left + 110,
			y: PAGE_H - MARGIN - 30,
			size: 12,
			color: 'panel-50',
			maxWidth: PAGE_W - 2 * MARGIN - 150
		},
		{
			text: 'Certificate of qualification',
			x: left,
			y: PAGE_H - 128,
			size: 30,
			weight: 'bold',
			color: 'panel-900'
		},
		{ text: 'This certifies that', x: left, y: PAGE_H - 162, size: 12, color: 'panel-500' },
		{
			text: input.holderName,
			x: left,
			y: PAGE_H - 204,
			size: 32,
			weight: 'bold',
			color: 'panel-900',
			maxWidth: textWidth
		},
		{
			text: `Employee no. ${input.employeeNo}`,
			x: left,
			y: PAGE_H - 226,
			size: 11,
			color: 'panel-700'
		},
		{
			text: 'is qualified for the process',
			x: left,
			y: PAGE_H - 256,
			size: 12,
			color: 'panel-500'
		},
		{
			text: `${input.processName} (${input.processCode})`,
			x: left,
			y: PAGE_H - 280,
			size: 18,
			weight: 'bold',
			color: 'panel-900',
			maxWidth: textWidth
		},
		{
			text: `Basis revisions — rule version ${input.ruleVersion}`,
			x: left,
			y: PAGE_H - 310,
			size: 10,
			weight: 'bold',
			color: 'film-700'
		}
	);

	// Column positions give the revision list a tabular, mono-like reading.
	input.basisRevisions.slice(0, 5).forEach((revision, index) => {
		const y = PAGE_H - 328 - index * 15;
		items.push(
			{ text: revision.docNumber, x: left, y, size: 10, color: 'panel-900', maxWidth: 118 },
			{
				text: `rev ${revision.letter}`,
				x: left + 124,
				y,
				size: 10,
				weight: 'bold',
				color: 'panel-900'
			},
			{
				text: revision.title,
				x: left + 174,
				y,
				size: 10,
				color: 'panel-700',
				maxWidth: textWidth - 174
			}
		);
	});
	if (input.basisRevisions.length > 5) {
		items.push({
			text: `and ${input.basisRevisions.length - 5} more (see the verification page)`,
			x: left,
			y: PAGE_H - 328 - 5 * 15,
			size: 9,
			color: 'panel-500'
		});
	}

	const datesY = 150;
	items.push(
		{ text: 'Issued', x: left, y: datesY + 16, size: 9, weight: 'bold', color: 'panel-500' },
		{
			text: dateInZone(input.issuedAt, input.timeZone),
			x: left,
			y: datesY,
			size: 12,
			color: 'panel-900'
		},
		{ text: 'Expires', x: left + 260, y: datesY + 16, size: 9, weight: 'bold', color: 'panel-500' },
		{
			text: dateInZone(input.expiresAt, input.timeZone),
			x: left + 260,
			y: datesY,
			size: 12,
			color: 'panel-900'
		},
		{ text: 'Signed', x: left, y: 112, size: 9, weight: 'bold', color: 'panel-500' },
		{
			text: `${input.issuer.name} — meaning: ${input.issuer.meaning}`,
			x: left,
			y: 97,
			size: 12,
			weight: 'bold',
			color: 'panel-900',
			maxWidth: textWidth
		},
		{
			text: `${utcStamp(input.issuer.signedAt)} · plant time ${formatLocal(input.issuer.signedAt, input.timeZone)} (${input.timeZone})`,
			x: left,
			y: 82,
			size: 10,
			color: 'panel-700',
			maxWidth: textWidth
		},
		{ text: 'Certificate no.', x: left, y: 60, size: 9, weight: 'bold', color: 'panel-500' },
		{ text: input.number, x: left + 78, y: 60, size: 11, weight: 'bold', color: 'film-700' },
		{
			text: 'Valid only while its status on the verification page is valid.',
			x: left,
			y: MARGIN + 4,
			size: 9,
			color: 'panel-700'
		},
		{
			text: 'Scan to verify',
			x: qrColumnX + 100,
			y: PAGE_H - 190,
			size: 10,
			weight: 'bold',
			color: 'panel-700',
			align: 'center'
		},
		{
			text: input.verifyUrl,
			x: qrColumnX + 100,
			y: PAGE_H - 408,
			size: 7.5,
			color: 'panel-700',
			align: 'center',
			maxWidth: 180
		}
	);
	return items;
}

function drawQr(page: PDFPage, text: string, x: number, y: number, sizePt: number): void {
	const { modules } = QRCode.create(text, { errorCorrectionLevel: 'M' });
	const quiet = 2;
	const cell = sizePt / (modules.size + 2 * quiet);
	page.drawRectangle({ x, y, width: sizePt, height: sizePt, color: rgb(1, 1, 1) });
	for (let row = 0; row < modules.size; row++) {
		// Horizontal strips of dark modules: fewer rectangles and no hairline gaps between cells.
		let col = 0;
		while (col < modules.size) {
			if (!modules.get(row, col)) {
				col++;
				continue;
			}
			const start = col;
			while (col < modules.size && modules.get(row, col)) col++;
			page.drawRectangle({
				x: x + (quiet + start) * cell,
				y: y + sizePt - (quiet + row + 1) * cell,
				width: (col - start) * cell,
				height: cell,
				color: rgb(0, 0, 0)
			});
		}
	}
}

type PlacedItem = TextItem & { runs: Run[] };

function createDocument(input: CertificatePdfInput): Promise<PDFDocument> {
	return PDFDocument.create().then((doc) => {
		doc.setTitle(`Certificate ${input.number}`);
		doc.setSubject(`${input.processName} (${input.processCode}) — ${input.holderName}`);
		doc.setProducer('Padbridge');
		doc.setCreator('Padbridge');
		doc.setCreationDate(input.issuer.signedAt);
		doc.setModificationDate(input.issuer.signedAt);
		return doc;
	});
}

/** Renders one certificate; fonts are cached per process, subset per document. */
export async function renderCertificatePdf(input: CertificatePdfInput): Promise<Uint8Array> {
	const fonts = await loadFonts();
	const items: PlacedItem[] = layoutText(input).map((item) => ({
		...item,
		runs: splitRuns(item.text, item.weight ?? 'regular', fonts)
	}));

	const usedText: Record<FontKey, string> = { regular: '', bold: '', cjk: '' };
	for (const item of items) for (const run of item.runs) usedText[run.font] += run.text;

	const doc = await createDocument(input);
	doc.registerFontkit(fontkit as unknown as Parameters<PDFDocument['registerFontkit']>[0]);

	const embedded: Partial<Record<FontKey, PDFFont>> = {};
	await Promise.all(
		(Object.keys(usedText) as FontKey[])
			.filter((key) => usedText[key].length > 0)
			.map(async (key) => {
				const subset = await subsetFont(fonts[key].bytes, usedText[key], {
					targetFormat: 'truetype'
				});
				// liga off as well: a ligature glyph (fi) loses its text in pdftotext's reading.
				embedded[key] = await doc.embedFont(new Uint8Array(subset), {
					subset: false,
					features: { ccmp: false, mark: false, mkmk: false, liga: false }
				});
			})
	);
	drawPage(doc, input, items, embedded);
	return doc.save({ useObjectStreams: true });
}

/**
 * The benchmark floor: the same page in pdf-lib's built-in Helvetica, no font files, no
 * subsetting. Only for Latin-1 text (WinAnsi); not for certificates people receive.
 */
export async function renderCertificatePdfWithStandardFonts(
	input: CertificatePdfInput
): Promise<Uint8Array> {
	const doc = await createDocument(input);
	const embedded: Partial<Record<FontKey, PDFFont>> = {
		regular: await doc.embedFont(StandardFonts.Helvetica),
		bold: await doc.embedFont(StandardFonts.HelveticaBold)
	};
	const items: PlacedItem[] = layoutText(input).map((item) => ({
		...item,
		runs: [{ text: item.text, font: item.weight ?? 'regular' }]
	}));
	drawPage(doc, input, items, embedded);
	return doc.save({ useObjectStreams: true });
}

function drawPage(
	doc: PDFDocument,
	input: CertificatePdfInput,
	items: PlacedItem[],
	embedded: Partial<Record<FontKey, PDFFont>>
): void {
	const page = doc.addPage([PAGE_W, PAGE_H]);
	page.drawRectangle({ x: 0, y: 0, width: PAGE_W, height: PAGE_H, color: tokenRgb('panel-50') });
	page.drawRectangle({
		x: MARGIN,
		y: MARGIN - 10,
		width: PAGE_W - 2 * MARGIN,
		height: PAGE_H - 2 * MARGIN + 10,
		color: rgb(1, 1, 1),
		borderColor: tokenRgb('panel-200'),
		borderWidth: 1
	});
	page.drawRectangle({
		x: MARGIN,
		y: PAGE_H - MARGIN - 44,
		width: PAGE_W - 2 * MARGIN,
		height: 44,
		color: tokenRgb('panel-900')
	});
	page.drawRectangle({
		x: MARGIN,
		y: PAGE_H - MARGIN - 50,
		width: PAGE_W - 2 * MARGIN,
		height: 6,
		color: tokenRgb('film-500')
	});
	page.drawRectangle({
		x: MARGIN + 18,
		y: 130,
		width: 500,
		height: 0.75,
		color: tokenRgb('panel-200')
	});

	for (const item of items) {
		let size = item.size;
		const widthAt = (at: number) =>
			item.runs.reduce((sum, run) => sum + embedded[run.font]!.widthOfTextAtSize(run.text, at), 0);
		if (item.maxWidth) while (size > 6 && widthAt(size) > item.maxWidth) size -= 0.5;
		let x = item.align === 'center' ? item.x - widthAt(size) / 2 : item.x;
		for (const run of item.runs) {
			const font = embedded[run.font]!;
			page.drawText(run.text, {
				x,
				y: item.y,
				size,
				font,
				color: tokenRgb(item.color ?? 'panel-900')
			});
			x += font.widthOfTextAtSize(run.text, size);
		}
	}

	const qrColumnX = PAGE_W - MARGIN - 200;
	drawQr(page, input.verifyUrl, qrColumnX + 10, PAGE_H - 396, 180);
	page.drawRectangle({
		x: qrColumnX + 10,
		y: PAGE_H - 396,
		width: 180,
		height: 180,
		borderColor: tokenRgb('film-500'),
		borderWidth: 1.5
	});
}
