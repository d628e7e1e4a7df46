// Certificate rows made directly in the database for tests: a certification rule (the FK every
// certificate needs) and a certificate in a given state and expiry, with a verify token and,
// on request, a small PDF in the S3 fake.
import { randomBytes } from 'node:crypto';
import { eq } from 'drizzle-orm';
import { PDFDocument, StandardFonts } from 'pdf-lib';
import { db } from '../../src/lib/server/db/index';
import { certificates, certificationRules, processes } from '../../src/lib/server/db/schema/index';
import { putObject } from '../../src/lib/server/storage/index';
import { hashVerifyToken } from '../../src/lib/server/certificates/issue';
import type { CertificateState } from '../../src/lib/training/vocabulary';

const DAY = 86_400_000;

export async function processIdOf(code: string): Promise<number> {
	const [p] = await db.select({ id: processes.id }).from(processes).where(eq(processes.code, code));
	if (!p) throw new Error(`no process ${code}`);
	return p.id;
}

/**
 * A rule version of its own for the process, active only from 2099 so that it never becomes the
 * rule in force for the demo data or other tests.
 */
export async function insertTestRule(
	processId: number,
	createdBy: number,
	opts: { showFullNameOnVerify?: boolean } = {}
): Promise<number> {
	const [{ id }] = await db
		.insert(certificationRules)
		.values({
			processId,
			version: 100_000 + Math.floor(Math.random() * 1_000_000_000),
			passMarkPct: 80,
			practicalRequired: true,
			validityMonths: 12,
			graceDays: 14,
			reminderDays: [30, 7],
			showFullNameOnVerify: opts.showFullNameOnVerify ?? false,
			note: 'test fixture',
			createdBy,
			activeFrom: new Date('2099-01-01T00:00:00Z')
		})
		.$returningId();
	return id;
}

export interface TestCertificate {
	id: number;
	number: string;
	token: string;
	ruleId: number;
	pdfKey: string | null;
}

export async function insertTestCertificate(opts: {
	personId: number;
	processCode: string;
	state?: CertificateState;
	/** Default: a year from now. */
	expiresAt?: Date;
	issuedAt?: Date;
	graceUntil?: Date | null;
	showFullNameOnVerify?: boolean;
	withPdf?: boolean;
	previousId?: number | null;
}): Promise<TestCertificate> {
	const processId = await processIdOf(opts.processCode);
	const ruleId = await insertTestRule(processId, opts.personId, {
		showFullNameOnVerify: opts.showFullNameOnVerify
	});
	const token = randomBytes(32).toString('base64url');
	const number = `TEST-${opts.processCode.replace('-', '')}-${randomBytes(5).toString('hex').toUpperCase()}`;
	let pdfKey: string | null = null;
	if (opts.withPdf) {
		const doc = await PDFDocument.create();
		const font = await doc.embedFont(StandardFonts.Helvetica);
		doc.addPage([400, 200]).drawText(`Certificate ${number}`, { x: 30, y: 100, size: 14, font });
		pdfKey = `certificates/test/${number}.pdf`;
		await putObject(pdfKey, await doc.save(), 'application/pdf');
	}
	const [{ id }] = await db
		.insert(certificates)
		.values({
			number,
			personId: opts.personId,
			processId,
			ruleId,
			state: opts.state ?? 'active',
			issuedAt: opts.issuedAt ?? new Date(Date.now() - 30 * DAY),
			expiresAt: opts.expiresAt ?? new Date(Date.now() + 365 * DAY),
			graceUntil: opts.graceUntil ?? null,
			signerName: 'Test issuer',
			signerRole: 'Quality',
			verifyTokenHash: hashVerifyToken(token),
			pdfKey,
			previousId: opts.previousId ?? null
		})
		.$returningId();
	return { id, number, token, ruleId, pdfKey };
}
