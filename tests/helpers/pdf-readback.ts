// Reading a PDF back the way a person would see it: its text layer (pdftotext), its fonts
// (pdffonts) and its rendered pixels (pdftoppm → tesseract OCR, pdftoppm → jsQR). The text layer
// alone cannot show missing glyphs, so names are also read from the rendered page.
import { execFile } from 'node:child_process';
import { readFile, writeFile } from 'node:fs/promises';
import path from 'node:path';
import { promisify } from 'node:util';
import jsQR from 'jsqr';
import { PNG } from 'pngjs';

const run = promisify(execFile);
// The whole page at 200 dpi for the QR (a module is about 8 px) and page OCR.
const RENDER_DPI = 200;
// The holder's name line (32 pt) is OCR'd from its own render at 120 dpi: glyphs about 53 px
// tall, where tesseract's chi_sim reads Noto Sans SC exactly (at 150 dpi and above it misreads 晓).
const NAME_DPI = 120;
// The name line's box on the page in points from the top-left, as laid out in pdf.ts.
const NAME_BOX_PT = { x: 50, y: 168, width: 520, height: 46 };

export type Rendered = {
	pdfPath: string;
	pngPath: string;
	namePngPath: string;
	sizeBytes: number;
	text: string;
	fonts: string;
};

/** Writes the PDF into `dir` and reads it back: text layer, fonts, page and name-line renders. */
export async function readPdf(bytes: Uint8Array, dir: string, name: string): Promise<Rendered> {
	const pdfPath = path.join(dir, `${name}.pdf`);
	await writeFile(pdfPath, bytes);
	const { stdout: text } = await run('pdftotext', ['-layout', pdfPath, '-']);
	const { stdout: fonts } = await run('pdffonts', [pdfPath]);
	const prefix = path.join(dir, name);
	await run('pdftoppm', ['-r', String(RENDER_DPI), '-png', '-singlefile', pdfPath, prefix]);
	const px = (pt: number) => String(Math.round((pt * NAME_DPI) / 72));
	const namePrefix = `${prefix}-name`;
	await run('pdftoppm', [
		...['-r', String(NAME_DPI), '-png', '-singlefile'],
		...['-x', px(NAME_BOX_PT.x), '-y', px(NAME_BOX_PT.y)],
		...['-W', px(NAME_BOX_PT.width), '-H', px(NAME_BOX_PT.height)],
		pdfPath,
		namePrefix
	]);
	return {
		pdfPath,
		pngPath: `${prefix}.png`,
		namePngPath: `${namePrefix}.png`,
		sizeBytes: bytes.length,
		text,
		fonts
	};
}

export async function ocr(
	pngPath: string,
	languages: string,
	pageSegmentation = 3
): Promise<string> {
	const { stdout } = await run(
		'tesseract',
		[pngPath, '-', '-l', languages, '--psm', String(pageSegmentation)],
		{ maxBuffer: 10 * 1024 * 1024 }
	);
	return stdout;
}

/**
 * One line of OCR, trimmed, with the spaces tesseract puts between two CJK characters removed
 * (they are not in the printed text). Nothing else is normalised.
 */
export async function ocrLine(pngPath: string, languages: string): Promise<string> {
	const line = (await ocr(pngPath, languages, 7)).trim();
	return line.replace(/(\p{Script=Han})\s+(?=\p{Script=Han})/gu, '$1');
}

export async function decodeQr(pngPath: string): Promise<string | undefined> {
	const png = PNG.sync.read(await readFile(pngPath));
	const code = jsQR(new Uint8ClampedArray(png.data), png.width, png.height);
	return code?.data;
}

/** Font rows of pdffonts: name and whether it is embedded. */
export function fontRows(pdffontsOutput: string): { name: string; embedded: boolean }[] {
	return pdffontsOutput
		.split('\n')
		.slice(2)
		.filter((line) => line.trim())
		.map((line) => {
			const columns = line.trim().split(/\s+/);
			// name, type (may be two words), encoding, emb, sub, uni, object, id
			return { name: columns[0], embedded: columns[columns.length - 5] === 'yes' };
		});
}

/** A box on a page in points from the top-left corner. */
export type BoxPt = { x: number; y: number; width: number; height: number };

/**
 * Writes the PDF into `dir` and reads its text layer page by page (pdftotext puts a form feed
 * between pages), with the page count pdfinfo reports. `pages` is the visual layout; `flat` is
 * each page in drawing order (-raw) with all white space collapsed to single spaces, so text a
 * table cell wrapped over several lines reads as one phrase.
 */
export async function readPdfPages(
	bytes: Uint8Array,
	dir: string,
	name: string
): Promise<{ pdfPath: string; pages: string[]; flat: string[]; pageCount: number; fonts: string }> {
	const pdfPath = path.join(dir, `${name}.pdf`);
	await writeFile(pdfPath, bytes);
	const { stdout: text } = await run('pdftotext', ['-layout', pdfPath, '-']);
	const { stdout: raw } = await run('pdftotext', ['-raw', pdfPath, '-']);
	const { stdout: info } = await run('pdfinfo', [pdfPath]);
	const { stdout: fonts } = await run('pdffonts', [pdfPath]);
	const pageCount = Number(/^Pages:\s+(\d+)/m.exec(info)?.[1] ?? 0);
	// The text ends with a form feed after the last page.
	const pages = text.split('\f').slice(0, pageCount);
	const flat = raw
		.split('\f')
		.slice(0, pageCount)
		.map((p) => p.replace(/\s+/g, ' ').trim());
	return { pdfPath, pages, flat, pageCount, fonts };
}

/** Renders one box of one page to a PNG at `dpi`; returns the PNG's path. */
export async function renderBox(
	pdfPath: string,
	page: number,
	box: BoxPt,
	dpi: number,
	outPrefix: string
): Promise<string> {
	const px = (pt: number) => String(Math.round((pt * dpi) / 72));
	await run('pdftoppm', [
		...['-r', String(dpi), '-png', '-singlefile', '-f', String(page), '-l', String(page)],
		...['-x', px(box.x), '-y', px(box.y), '-W', px(box.width), '-H', px(box.height)],
		pdfPath,
		outPrefix
	]);
	return `${outPrefix}.png`;
}
