import { describe, expect, it } from 'vitest';
import { IMAGE_LIMIT_BYTES, PDF_LIMIT_BYTES, oversizeMessage } from './upload-limits';

const MiB = 1024 * 1024;

describe('oversizeMessage', () => {
	it('lets an image of exactly 10 MiB through and refuses one byte more, naming its size', () => {
		expect(IMAGE_LIMIT_BYTES).toBe(10 * MiB);
		expect(oversizeMessage({ size: 10 * MiB, type: 'image/png' }, { pdf: false })).toBe('');
		expect(oversizeMessage({ size: 10 * MiB + 1, type: 'image/jpeg' }, { pdf: false })).toBe(
			'This file is 10.0 MB; images may be at most 10 MB.'
		);
		expect(oversizeMessage({ size: 31 * MiB, type: 'image/webp' }, { pdf: true })).toMatch(
			/^This file is 31\.0 MB/
		);
	});

	it('gives a PDF 20 MiB where PDFs are accepted, and the image limit where they are not', () => {
		expect(PDF_LIMIT_BYTES).toBe(20 * MiB);
		const pdf = { size: 15 * MiB, type: 'application/pdf' };
		expect(oversizeMessage(pdf, { pdf: true })).toBe('');
		expect(oversizeMessage(pdf, { pdf: false })).toBe(
			'This file is 15.0 MB; images may be at most 10 MB.'
		);
		expect(oversizeMessage({ size: 20 * MiB + 1, type: 'application/pdf' }, { pdf: true })).toBe(
			'This PDF is 20.0 MB; PDF files may be at most 20 MB.'
		);
	});

	it('says nothing of an empty file (the server names that)', () => {
		expect(oversizeMessage({ size: 0, type: '' }, { pdf: true })).toBe('');
	});
});
