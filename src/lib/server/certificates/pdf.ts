// The certificate as a PDF: one A4 landscape page, vector QR, fonts subset to the page's text
// (the font handling is shared with the other PDFs, see ../pdf/fonts.ts).
import { PDFDocument, rgb, type PDFPage } from 'pdf-lib';
import QRCode from 'qrcode';
import { formatLocal, localDate } from '../../time';
import { PdfFonts, type Weight } from '../pdf/fonts';
import { tokenRgb, type Token } from '../pdf/colors';

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
	const items = layoutText(input);
	const doc = await createDocument(input);
	const fonts = await PdfFonts.embed(
		doc,
		items.map((item) => [item.text, item.weight ?? 'regular'] as [string, Weight])
	);
	drawPage(doc, input, items, fonts);
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
	drawPage(doc, input, layoutText(input), await PdfFonts.standard(doc));
	return doc.save({ useObjectStreams: true });
}

function drawPage(
	doc: PDFDocument,
	input: CertificatePdfInput,
	items: TextItem[],
	fonts: PdfFonts
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
		const weight = item.weight ?? 'regular';
		let size = item.size;
		const widthAt = (at: number) => fonts.width(item.text, at, weight);
		if (item.maxWidth) while (size > 6 && widthAt(size) > item.maxWidth) size -= 0.5;
		const x = item.align === 'center' ? item.x - widthAt(size) / 2 : item.x;
		fonts.draw(page, item.text, {
			x,
			y: item.y,
			size,
			weight,
			color: tokenRgb(item.color ?? 'panel-900')
		});
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
