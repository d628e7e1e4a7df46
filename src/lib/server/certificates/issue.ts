// Issuing certificates: when the rule in force for a process is met, one transaction writes the
// certificate, its basis records, the superseding of the previous certificate and the audit
// event. The PDF is rendered after the commit and stored in the object store.
import { createHash, randomBytes } from 'node:crypto';
import { and, eq, inArray } from 'drizzle-orm';
import { db, type Tx } from '../db';
import {
	certificateBasis,
	certificates,
	certificationRules,
	instructions,
	people,
	processes,
	revisions,
	sites
} from '../db/schema';
import { recordAudit, type Actor } from '../audit';
import { putObject } from '../storage';
import { config } from '../config';
import { localDate, zonedToUtc } from '../../time';
import { evaluatePerson, type ProcessEvaluation } from './evaluate';
import { renderCertificatePdf } from './pdf';
import { faultPoint } from '../faults';

export interface IssueResult {
	certificateId: number | null;
	number: string | null;
	/** Labels of the requirements still missing (empty when issued). */
	missing: string[];
}

const sha256 = (s: string) => createHash('sha256').update(s, 'utf8').digest('hex');

/** A new unguessable verification token (256 bits) and the hash kept in the database. */
export function newVerifyToken(): { token: string; hash: string } {
	const token = randomBytes(32).toString('base64url');
	return { token, hash: sha256(token) };
}

export const hashVerifyToken = sha256;

/** Adds whole months to a calendar date, clamping to the month's last day (Jan 31 + 1 → Feb 28). */
export function addMonthsToDate(date: string, months: number): string {
	const [y, m, d] = date.split('-').map(Number);
	const total = y * 12 + (m - 1) + months;
	const ny = Math.floor(total / 12);
	const nm = (total % 12) + 1;
	const last = new Date(Date.UTC(ny, nm, 0)).getUTCDate();
	return `${ny}-${String(nm).padStart(2, '0')}-${String(Math.min(d, last)).padStart(2, '0')}`;
}

/**
 * The exact expiry instant: 00:00 in the plant's zone on the issue date plus the validity, so a
 * certificate issued on 2026-12-02 for 12 months is valid through 2027-12-01 and expired from
 * 2027-12-02 00:00 plant time.
 */
export function expiryInstant(issuedAt: Date, validityMonths: number, timeZone: string): Date {
	return zonedToUtc(
		addMonthsToDate(localDate(issuedAt, timeZone), validityMonths),
		'00:00',
		timeZone
	);
}

/** The IANA zone of the person's site (the first site when they have none). */
export async function siteZoneOf(personId: number, conn: Tx | typeof db): Promise<string> {
	const [row] = await conn
		.select({ timeZone: sites.timeZone })
		.from(people)
		.leftJoin(sites, eq(sites.id, people.siteId))
		.where(eq(people.id, personId));
	if (row?.timeZone) return row.timeZone;
	const [first] = await conn.select({ timeZone: sites.timeZone }).from(sites).limit(1);
	return first?.timeZone ?? 'UTC';
}

function certificateNumber(processCode: string, issuedAt: Date, id: number, zone: string) {
	const year = localDate(issuedAt, zone).slice(0, 4);
	const plant = config.plantCode;
	return `${plant}-${processCode.replace(/[^A-Z0-9]/gi, '').toUpperCase()}-${year}-${String(id).padStart(6, '0')}`;
}

/**
 * Evaluates the rule in force for the person and process and, when every requirement is met,
 * issues a certificate. Safe to call after any training record is written: concurrent calls for
 * one person queue on the person's row, and the second finds the evidence already used.
 */
export async function evaluateAndIssue(
	personId: number,
	processId: number,
	opts: { now?: Date; actor?: Actor | null } = {}
): Promise<IssueResult> {
	const now = opts.now ?? new Date();
	const result = await db.transaction(async (tx) => {
		await tx.select({ id: people.id }).from(people).where(eq(people.id, personId)).for('update');
		const ev = await evaluatePerson(personId, processId, now, tx);
		if (!ev || !ev.met || ev.ruleId == null) {
			return {
				certificateId: null,
				number: null,
				missing: ev
					? ev.ruleId == null
						? ['No certification rule is in force for this process.']
						: ev.requirements.filter((r) => !r.met).map((r) => r.label)
					: ['No such person or process.']
			};
		}
		const issued = await writeCertificate(tx, ev, now, opts.actor ?? null);
		return { certificateId: issued.id, number: issued.number, missing: [], token: issued.token };
	});
	if (result.certificateId != null && 'token' in result) {
		await storeCertificatePdf(result.certificateId, result.token as string).catch(() => {
			// The certificate stands without its file; ensureCertificatePdf makes it on first download.
		});
	}
	return { certificateId: result.certificateId, number: result.number, missing: result.missing };
}

async function writeCertificate(tx: Tx, ev: ProcessEvaluation, now: Date, actor: Actor | null) {
	const [rule] = await tx
		.select({
			id: certificationRules.id,
			version: certificationRules.version,
			validityMonths: certificationRules.validityMonths,
			createdBy: certificationRules.createdBy,
			signerName: people.displayName
		})
		.from(certificationRules)
		.innerJoin(people, eq(people.id, certificationRules.createdBy))
		.where(eq(certificationRules.id, ev.ruleId!));
	const zone = await siteZoneOf(ev.personId, tx);
	const expiresAt = expiryInstant(now, rule.validityMonths, zone);
	const { token, hash } = newVerifyToken();
	const previous =
		ev.certificate &&
		['valid', 'expiring', 'retraining_due', 'retraining_overdue'].includes(ev.certificate.status)
			? ev.certificate
			: null;

	const [{ id }] = await tx
		.insert(certificates)
		.values({
			number: `pending-${hash.slice(0, 24)}`,
			personId: ev.personId,
			processId: ev.processId,
			ruleId: rule.id,
			state: 'active',
			issuedAt: now,
			expiresAt,
			issuedBy: rule.createdBy,
			signerName: rule.signerName,
			signerRole: `Quality — certification rule ${ev.processCode} v${rule.version}`,
			verifyTokenHash: hash,
			previousId: ev.certificate?.id ?? null,
			stateChangedAt: now
		})
		.$returningId();
	await faultPoint('issue-certificate');
	const number = certificateNumber(ev.processCode, now, id, zone);
	await tx.update(certificates).set({ number }).where(eq(certificates.id, id));

	const basis = ev.requirements
		.filter((r) => r.met && r.refId != null)
		.map((r) => ({
			certificateId: id,
			kind: r.kind === 'check' ? ('attempt' as const) : r.kind,
			refId: r.refId!,
			revisionId: r.revisionId ?? null
		}));
	if (basis.length) await tx.insert(certificateBasis).values(basis);

	if (previous) {
		await tx
			.update(certificates)
			.set({
				state: 'superseded',
				stateReason: `renewed by ${number}`,
				stateChangedAt: now,
				stateChangedBy: null
			})
			.where(eq(certificates.id, previous.id));
		await recordAudit(tx, actor, {
			action: 'certificate.superseded',
			entityType: 'certificate',
			entityId: previous.id,
			oldValues: { status: previous.status },
			newValues: { state: 'superseded', by: number },
			reason: 'renewal'
		});
	}
	await recordAudit(tx, actor, {
		action: 'certificate.issued',
		entityType: 'certificate',
		entityId: id,
		newValues: {
			number,
			personId: ev.personId,
			process: ev.processCode,
			ruleId: rule.id,
			ruleVersion: rule.version,
			issuedAt: now.toISOString(),
			expiresAt: expiresAt.toISOString(),
			basis: basis.map((b) => ({ kind: b.kind, id: b.refId, revisionId: b.revisionId })),
			previous: previous?.number ?? null
		},
		reason: 'certification rule met'
	});
	return { id, number, token };
}

/** Renders the certificate's PDF with the given verify token and stores it; returns the bytes. */
export async function storeCertificatePdf(
	certificateId: number,
	token: string
): Promise<Uint8Array> {
	const [c] = await db
		.select({
			id: certificates.id,
			number: certificates.number,
			personId: certificates.personId,
			issuedAt: certificates.issuedAt,
			expiresAt: certificates.expiresAt,
			signerName: certificates.signerName,
			ruleVersion: certificationRules.version,
			holderName: people.displayName,
			employeeNo: people.employeeNo,
			processName: processes.name,
			processCode: processes.code
		})
		.from(certificates)
		.innerJoin(people, eq(people.id, certificates.personId))
		.innerJoin(processes, eq(processes.id, certificates.processId))
		.innerJoin(certificationRules, eq(certificationRules.id, certificates.ruleId))
		.where(eq(certificates.id, certificateId));
	if (!c) throw new Error(`certificate ${certificateId} not found`);
	const basisRevisions = await db
		.select({
			docNumber: instructions.docNumber,
			letter: revisions.letter,
			title: instructions.title
		})
		.from(certificateBasis)
		.innerJoin(revisions, eq(revisions.id, certificateBasis.revisionId))
		.innerJoin(instructions, eq(instructions.id, revisions.instructionId))
		.where(
			and(
				eq(certificateBasis.certificateId, certificateId),
				inArray(certificateBasis.kind, ['acknowledgement'])
			)
		);
	const timeZone = await siteZoneOf(c.personId, db);
	const bytes = await renderCertificatePdf({
		number: c.number,
		holderName: c.holderName,
		employeeNo: c.employeeNo,
		processName: c.processName,
		processCode: c.processCode,
		basisRevisions,
		ruleVersion: c.ruleVersion,
		issuedAt: c.issuedAt,
		expiresAt: c.expiresAt,
		timeZone,
		plantName: config.plantName,
		issuer: { name: c.signerName, meaning: 'issued', signedAt: c.issuedAt },
		verifyUrl: `${config.publicUrl}/verify/${token}`
	});
	const key = `certificates/${c.number}-${randomBytes(6).toString('hex')}.pdf`;
	await putObject(key, bytes, 'application/pdf');
	await db
		.update(certificates)
		.set({ pdfKey: key, verifyTokenHash: sha256(token) })
		.where(eq(certificates.id, certificateId));
	return bytes;
}

/**
 * The PDF's object key, making the file when it is missing (the store was down at issue time).
 * The token only ever lived in the PDF, so a remade PDF carries a fresh token and the old one stops
 * verifying.
 */
export async function ensureCertificatePdf(certificateId: number): Promise<string> {
	const [c] = await db
		.select({ pdfKey: certificates.pdfKey })
		.from(certificates)
		.where(eq(certificates.id, certificateId));
	if (!c) throw new Error(`certificate ${certificateId} not found`);
	if (c.pdfKey) return c.pdfKey;
	await storeCertificatePdf(certificateId, newVerifyToken().token);
	const [after] = await db
		.select({ pdfKey: certificates.pdfKey })
		.from(certificates)
		.where(eq(certificates.id, certificateId));
	return after.pdfKey!;
}
