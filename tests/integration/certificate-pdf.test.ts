// The certificate PDF read back three ways: its text layer (pdftotext), its fonts (pdffonts) and
// its rendered pixels (pdftoppm → tesseract OCR, pdftoppm → jsQR). The text layer alone cannot
// show missing glyphs, so every holder name is also read from the rendered page.
import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import {
	renderCertificatePdf,
	type CertificatePdfInput
} from '../../src/lib/server/certificates/pdf';
import { decodeQr, fontRows, ocr, ocrLine, readPdf, type Rendered } from '../helpers/pdf-readback';

let dir: string;
beforeAll(async () => {
	dir = await mkdtemp(path.join(tmpdir(), 'padbridge-cert-pdf-'));
});
afterAll(async () => {
	await rm(dir, { recursive: true, force: true });
});

function certificateFor(holderName: string, serial: number): CertificatePdfInput {
	return {
		number: `KBO2-COG-MB-2026-${String(serial).padStart(5, '0')}`,
		holderName,
		employeeNo: `KB-${10400 + serial}`,
		processName: 'COG main bond',
		processCode: 'COG-MB',
		basisRevisions: [
			{ docNumber: 'WI-COG-014', letter: 'C', title: 'COG main bond on BX-7' },
			{ docNumber: 'WI-ACF-002', letter: 'B', title: 'ACF storage, thaw and handling' }
		],
		ruleVersion: 3,
		// 23:30 UTC is already the next day in Ho Chi Minh City: the printed date must be the plant's.
		issuedAt: new Date('2026-11-29T23:30:00Z'),
		expiresAt: new Date('2027-11-29T23:30:00Z'),
		timeZone: 'Asia/Ho_Chi_Minh',
		plantName: 'Kestrel Bay Optronics — Plant 2',
		issuer: { name: 'Lê Văn Quang', meaning: 'issued', signedAt: new Date('2026-11-29T23:30:00Z') },
		verifyUrl: `https://padbridge.example/verify/tk${serial}Qw7Zr2mVx9PcL4hN8sJ3yB5dF`
	};
}

async function renderAndRead(input: CertificatePdfInput, name: string): Promise<Rendered> {
	return readPdf(await renderCertificatePdf(input), dir, name);
}

function expectCommonText(rendered: Rendered, input: CertificatePdfInput): void {
	expect(rendered.text).toContain(input.holderName);
	expect(rendered.text).toContain(input.number);
	expect(rendered.text).toContain('Certificate of qualification');
	// Issue and expiry in the plant's zone: 23:30 UTC on the 29th is the 30th at GMT+7.
	expect(rendered.text).toContain('2026-11-30 (Asia/Ho_Chi_Minh, GMT+7)');
	expect(rendered.text).toContain('2027-11-30 (Asia/Ho_Chi_Minh, GMT+7)');
	expect(rendered.text).not.toContain('2026-11-29 (');
	// The signer's manifestation: name, meaning, UTC and plant time.
	expect(rendered.text).toContain('Lê Văn Quang — meaning: issued');
	expect(rendered.text).toContain('2026-11-29 23:30 UTC');
	expect(rendered.text).toContain('plant time 2026-11-30 06:30 GMT+7');
	expect(rendered.text).toContain(input.verifyUrl);
	expect(rendered.text).toContain('WI-COG-014');
	expect(rendered.text).toContain('Valid only while its status on the verification page is valid.');
	const rows = fontRows(rendered.fonts);
	expect(rows.length).toBeGreaterThan(0);
	for (const row of rows) expect(row, row.name).toMatchObject({ embedded: true });
	expect(rendered.sizeBytes).toBeLessThan(150 * 1024);
}

describe('certificate PDF', () => {
	it('prints a Vietnamese name that renders, OCRs and carries a decodable QR', async () => {
		const input = certificateFor('Nguyễn Thị Minh Châu', 42);
		const rendered = await renderAndRead(input, 'vietnamese');
		expectCommonText(rendered, input);
		const names = fontRows(rendered.fonts).map((row) => row.name);
		expect(names.some((name) => name.includes('NotoSans-Regular'))).toBe(true);
		expect(names.some((name) => name.includes('NotoSans-Bold'))).toBe(true);
		// No CJK on the page, so the CJK font is not embedded at all.
		expect(names.some((name) => name.includes('NotoSansSC'))).toBe(false);

		expect(await ocrLine(rendered.namePngPath, 'vie')).toBe(input.holderName);
		// The rest of the page renders too: title, number and the signer's name, from pixels.
		const page = await ocr(rendered.pngPath, 'vie');
		expect(page).toContain('Certificate of qualification');
		expect(page).toContain(input.number);
		expect(page).toContain('Lê Văn Quang');
		expect(await decodeQr(rendered.pngPath)).toBe(input.verifyUrl);
	});

	it('prints a Chinese name that renders and OCRs', async () => {
		const input = certificateFor('陈晓燕', 43);
		const rendered = await renderAndRead(input, 'chinese');
		expectCommonText(rendered, input);
		expect(fontRows(rendered.fonts).some((row) => row.name.includes('NotoSansSC'))).toBe(true);

		expect(await ocrLine(rendered.namePngPath, 'chi_sim')).toBe('陈晓燕');
		expect(await decodeQr(rendered.pngPath)).toBe(input.verifyUrl);
	});

	it('prints a mixed Vietnamese and Chinese name with both fonts', async () => {
		const input = certificateFor('Trần Thị Thu Hà / 王伟', 44);
		const rendered = await renderAndRead(input, 'mixed');
		expectCommonText(rendered, input);
		const names = fontRows(rendered.fonts).map((row) => row.name);
		expect(names.some((name) => name.includes('NotoSansSC'))).toBe(true);
		expect(names.some((name) => name.includes('NotoSans-Bold'))).toBe(true);

		expect(await ocrLine(rendered.namePngPath, 'vie+chi_sim')).toBe(input.holderName);
		expect(await decodeQr(rendered.pngPath)).toBe(input.verifyUrl);
	});
});
