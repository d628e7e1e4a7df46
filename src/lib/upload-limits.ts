// How large an upload may be, shared by the server's checks (instructions/files.ts, used for
// instruction files and sign-off photos) and the pages, which refuse a file that is too large as
// soon as it is chosen instead of after sending it.

export const IMAGE_LIMIT_BYTES = 10 * 1024 * 1024;
export const PDF_LIMIT_BYTES = 20 * 1024 * 1024;

const mb = (n: number) => `${(n / 1024 / 1024).toFixed(1)} MB`;

/**
 * What is wrong with a chosen file's size, or '' when nothing is. The browser's type is only a
 * hint (the server decides by content), so a file that says it is a PDF gets the PDF limit only
 * where PDFs are accepted at all.
 */
export function oversizeMessage(
	file: { size: number; type: string },
	accepts: { pdf: boolean }
): string {
	const pdf = accepts.pdf && file.type === 'application/pdf';
	const limit = pdf ? PDF_LIMIT_BYTES : IMAGE_LIMIT_BYTES;
	if (file.size <= limit) return '';
	return pdf
		? `This PDF is ${mb(file.size)}; PDF files may be at most 20 MB.`
		: `This file is ${mb(file.size)}; images may be at most 10 MB.`;
}

/**
 * For a file input's change event: while the chosen file is too large the browser keeps the form
 * from being sent; the message is returned for the page to show beside the field.
 */
export function checkChosenFile(input: HTMLInputElement, accepts: { pdf: boolean }): string {
	const file = input.files?.[0];
	const problem = file ? oversizeMessage(file, accepts) : '';
	// The page shows the message beside the field; the browser's own bubble comes on a submit.
	input.setCustomValidity(problem);
	return problem;
}
