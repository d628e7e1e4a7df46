// Certification rules evaluated requirement by requirement, certificates issued in one transaction
// with their basis and audit event, and the lifecycle moving certificates on time.
import { createHash } from 'node:crypto';
import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { decodeQr, ocrLine, readPdf } from '../helpers/pdf-readback';
import { getObjectStream } from '../../src/lib/server/storage';
import { config } from '../../src/lib/server/config';
import { localDate } from '../../src/lib/time';
import { appDb, closeDbHelpers, createTestPerson, queryRows, type TestPerson } from '../helpers/db';
import {
	acknowledge,
	certificateRows,
	completedSignoff,
	makeCheck,
	makeChecklist,
	makeInstructionRows,
	makeProcess,
	makeRule,
	submittedAttempt
} from '../helpers/training-fixtures';
import {
	ensureCertificatePdf,
	evaluateAndIssue,
	expiryInstant
} from '../../src/lib/server/certificates/issue';
import { evaluatePerson } from '../../src/lib/server/certificates/evaluate';
import { runCertificateLifecycle } from '../../src/lib/server/certificates/lifecycle';
import { certificatesOf } from '../../src/lib/server/certificates/queries';
import { takeLease } from '../../src/lib/server/jobs/lease';
import { pool } from '../../src/lib/server/db';

const DAY = 86_400_000;
let quality: TestPerson;
let trainer: TestPerson;

beforeAll(async () => {
	quality = await createTestPerson({ roles: ['quality'] });
	trainer = await createTestPerson({ roles: ['trainer'] });
});
afterAll(async () => {
	await closeDbHelpers();
	await pool.end();
});

/** A process with one instruction (rev A effective 60 days ago), a check, a checklist and a rule. */
async function setup(opts: { practical?: boolean; check?: boolean } = {}) {
	const proc = await makeProcess();
	const ins = await makeInstructionRows(quality.id, proc.id, [
		{ letter: 'A', effectiveFrom: new Date(Date.now() - 60 * DAY) }
	]);
	const check = await makeCheck(proc.id, trainer.id);
	const checklistId = await makeChecklist(proc.id, ins.revisionIds[0], trainer.id);
	const ruleId = await makeRule({
		processId: proc.id,
		createdBy: quality.id,
		instructionIds: [ins.id],
		checkId: opts.check === false ? null : check.checkId,
		practicalRequired: opts.practical !== false,
		checklistId
	});
	return { proc, ins, check, checklistId, ruleId };
}

async function auditCount(action: string, entityId: number) {
	const [r] = await queryRows<{ n: number }>(
		appDb(),
		"SELECT COUNT(*) AS n FROM audit_events WHERE action = ? AND entity_type = 'certificate' AND entity_id = ?",
		[action, String(entityId)]
	);
	return Number(r.n);
}

describe('rule evaluation: each requirement missing → no certificate', () => {
	it('issues only when acknowledgement, passed check and countersigned practical are all there', async () => {
		const s = await setup();
		const op = await createTestPerson({ roles: ['operator'], withEmail: false });

		let r = await evaluateAndIssue(op.id, s.proc.id);
		expect(r.certificateId).toBeNull();
		expect(r.missing).toHaveLength(3);

		await acknowledge(op.id, s.ins.revisionIds[0]);
		r = await evaluateAndIssue(op.id, s.proc.id);
		expect(r.certificateId).toBeNull();
		expect(r.missing.map((m) => m.split(' ')[0])).toEqual(['Pass', 'Practical']);

		// A failed attempt does not count.
		await submittedAttempt(op.id, s.check, s.proc.id, false);
		r = await evaluateAndIssue(op.id, s.proc.id);
		expect(r.missing.map((m) => m.split(' ')[0])).toEqual(['Pass', 'Practical']);

		const attemptId = await submittedAttempt(op.id, s.check, s.proc.id, true);
		r = await evaluateAndIssue(op.id, s.proc.id);
		expect(r.missing.map((m) => m.split(' ')[0])).toEqual(['Practical']);

		// A failed practical does not count either.
		await completedSignoff(
			op.id,
			trainer.id,
			s.checklistId,
			s.proc.id,
			s.ins.revisionIds[0],
			false
		);
		r = await evaluateAndIssue(op.id, s.proc.id);
		expect(r.certificateId).toBeNull();

		const signoffId = await completedSignoff(
			op.id,
			trainer.id,
			s.checklistId,
			s.proc.id,
			s.ins.revisionIds[0],
			true
		);
		r = await evaluateAndIssue(op.id, s.proc.id);
		expect(r.certificateId).not.toBeNull();
		expect(r.number).toMatch(new RegExp(`^KBO2-${s.proc.code.replace('-', '')}-\\d{4}-\\d{6}$`));

		const basis = await queryRows<{ kind: string; ref_id: number; revision_id: number | null }>(
			appDb(),
			'SELECT kind, ref_id, revision_id FROM certificate_basis WHERE certificate_id = ? ORDER BY kind',
			[r.certificateId]
		);
		expect(basis.map((b) => [b.kind, Number(b.ref_id)])).toEqual([
			['acknowledgement', expect.any(Number)],
			['attempt', attemptId],
			['signoff', signoffId]
		]);
		expect(Number(basis[0].revision_id)).toBe(s.ins.revisionIds[0]);
		expect(await auditCount('certificate.issued', r.certificateId!)).toBe(1);

		const [cert] = await certificateRows(op.id, s.proc.id);
		expect(Number(cert.previous_id ?? 0)).toBe(0);
		expect(cert.pdf_key).toMatch(/^certificates\/.+\.pdf$/);
		expect(Number((cert as unknown as { rule_id: number }).rule_id)).toBe(s.ruleId);

		// The evidence is used: a second call issues nothing more.
		const again = await evaluateAndIssue(op.id, s.proc.id);
		expect(again.certificateId).toBeNull();
		expect(await certificateRows(op.id, s.proc.id)).toHaveLength(1);
	});

	it('no rule in force → no certificate, and a future rule version is not in force yet', async () => {
		const proc = await makeProcess();
		const op = await createTestPerson({ roles: ['operator'] });
		const r = await evaluateAndIssue(op.id, proc.id);
		expect(r.certificateId).toBeNull();
		expect(r.missing[0]).toMatch(/No certification rule/);

		await makeRule({
			processId: proc.id,
			createdBy: quality.id,
			instructionIds: [],
			activeFrom: new Date(Date.now() + DAY)
		});
		expect((await evaluateAndIssue(op.id, proc.id)).certificateId).toBeNull();
		// The same rule is met (it asks for nothing) once its version is in force.
		const tomorrow = await evaluatePerson(op.id, proc.id, new Date(Date.now() + 2 * DAY));
		expect(tomorrow?.met).toBe(true);
	});

	it('an acknowledgement of an older revision does not meet the rule', async () => {
		const proc = await makeProcess();
		const ins = await makeInstructionRows(quality.id, proc.id, [
			{ letter: 'A', effectiveFrom: new Date(Date.now() - 60 * DAY) },
			{ letter: 'B', effectiveFrom: new Date(Date.now() - 5 * DAY), classification: 'acknowledge' }
		]);
		await makeRule({ processId: proc.id, createdBy: quality.id, instructionIds: [ins.id] });
		const op = await createTestPerson({ roles: ['operator'] });
		await acknowledge(op.id, ins.revisionIds[0]);
		expect((await evaluateAndIssue(op.id, proc.id)).certificateId).toBeNull();
		await acknowledge(op.id, ins.revisionIds[1]);
		expect((await evaluateAndIssue(op.id, proc.id)).certificateId).not.toBeNull();
	});

	it('parallel evaluations for one person issue exactly one certificate', async () => {
		const s = await setup({ practical: false });
		const op = await createTestPerson({ roles: ['operator'] });
		await acknowledge(op.id, s.ins.revisionIds[0]);
		await submittedAttempt(op.id, s.check, s.proc.id, true);
		const results = await Promise.all(
			Array.from({ length: 6 }, () => evaluateAndIssue(op.id, s.proc.id))
		);
		expect(results.filter((r) => r.certificateId != null)).toHaveLength(1);
		expect(await certificateRows(op.id, s.proc.id)).toHaveLength(1);
	});
});

describe('expiry at the exact instant in the plant time zone', () => {
	it('expires at 00:00 Asia/Ho_Chi_Minh on the anniversary date, not a millisecond before', async () => {
		// 2026-12-02T20:30Z is already 2026-12-03 03:30 in Ho Chi Minh City (UTC+7).
		const issuedAt = new Date('2026-12-02T20:30:00Z');
		const expected = new Date('2027-12-02T17:00:00Z'); // 2027-12-03 00:00 at UTC+7
		expect(expiryInstant(issuedAt, 12, 'Asia/Ho_Chi_Minh')).toEqual(expected);
		// Month-end clamp: 31 January + 1 month → 28 February (2027 is not a leap year).
		expect(expiryInstant(new Date('2027-01-31T03:00:00Z'), 1, 'Asia/Ho_Chi_Minh')).toEqual(
			new Date('2027-02-27T17:00:00Z')
		);

		const s = await setup({ practical: false, check: false });
		const op = await createTestPerson({ roles: ['operator'] });
		await acknowledge(op.id, s.ins.revisionIds[0], new Date(Date.now() - DAY));
		const r = await evaluateAndIssue(op.id, s.proc.id, { now: new Date(Date.now() - 1000) });
		const [cert] = await certificateRows(op.id, s.proc.id);
		const at = cert.expires_at;

		const before = new Date(at.getTime() - 1);
		expect((await certificatesOf(op.id, s.proc.id, before))[0].status).toBe('expiring');
		expect((await certificatesOf(op.id, s.proc.id, at))[0].status).toBe('expired');

		await runCertificateLifecycle(before);
		expect((await certificateRows(op.id, s.proc.id))[0].state).toBe('active');
		expect(await auditCount('certificate.expired', r.certificateId!)).toBe(0);
		await runCertificateLifecycle(at);
		expect((await certificateRows(op.id, s.proc.id))[0].state).toBe('expired');
		expect(await auditCount('certificate.expired', r.certificateId!)).toBe(1);
		// Idempotent: a second run changes nothing and audits nothing.
		await runCertificateLifecycle(at);
		expect(await auditCount('certificate.expired', r.certificateId!)).toBe(1);
	});
});

describe('retraining due when a retraining-required revision becomes effective', () => {
	it('moves exactly the certificates based on an older revision of that instruction', async () => {
		const proc = await makeProcess();
		const effectiveC = new Date(Date.now() + 3_600_000);
		const x = await makeInstructionRows(quality.id, proc.id, [
			{ letter: 'A', effectiveFrom: new Date(Date.now() - 90 * DAY) },
			{ letter: 'B', effectiveFrom: new Date(Date.now() - 30 * DAY) },
			{ letter: 'C', effectiveFrom: effectiveC, classification: 'retraining' }
		]);
		const other = await makeProcess();
		const y = await makeInstructionRows(quality.id, other.id, [
			{ letter: 'A', effectiveFrom: new Date(Date.now() - 90 * DAY) },
			// An acknowledge-only revision becoming effective moves nobody.
			{ letter: 'B', effectiveFrom: effectiveC, classification: 'acknowledge' }
		]);
		await makeRule({
			processId: proc.id,
			createdBy: quality.id,
			instructionIds: [x.id],
			graceDays: 14
		});
		await makeRule({ processId: other.id, createdBy: quality.id, instructionIds: [y.id] });

		const onB = await createTestPerson({ roles: ['operator'] });
		const onOther = await createTestPerson({ roles: ['operator'] });
		await acknowledge(onB.id, x.revisionIds[1]);
		await acknowledge(onOther.id, y.revisionIds[0]);
		const certB = await evaluateAndIssue(onB.id, proc.id);
		const certOther = await evaluateAndIssue(onOther.id, other.id);
		expect(certB.certificateId).not.toBeNull();
		expect(certOther.certificateId).not.toBeNull();

		await runCertificateLifecycle(new Date(effectiveC.getTime() - 1));
		expect((await certificateRows(onB.id, proc.id))[0].state).toBe('active');

		await runCertificateLifecycle(effectiveC);
		const [moved] = await certificateRows(onB.id, proc.id);
		expect(moved.state).toBe('retraining_due');
		expect(moved.grace_until).toEqual(new Date(effectiveC.getTime() + 14 * DAY));
		expect((await certificateRows(onOther.id, other.id))[0].state).toBe('active');
		expect(await auditCount('certificate.retraining_due', certB.certificateId!)).toBe(1);
		expect(await auditCount('certificate.retraining_due', certOther.certificateId!)).toBe(0);

		// Within grace it still qualifies (with a warning); after grace it is overdue.
		const inGrace = new Date(effectiveC.getTime() + DAY);
		expect((await certificatesOf(onB.id, proc.id, inGrace))[0].status).toBe('retraining_due');
		const afterGrace = new Date(effectiveC.getTime() + 14 * DAY);
		expect((await certificatesOf(onB.id, proc.id, afterGrace))[0].status).toBe(
			'retraining_overdue'
		);

		// Retraining: acknowledging C renews, supersedes the old certificate and keeps the chain.
		await acknowledge(onB.id, x.revisionIds[2], inGrace);
		const renewed = await evaluateAndIssue(onB.id, proc.id, { now: inGrace });
		expect(renewed.certificateId).not.toBeNull();
		const rows = await certificateRows(onB.id, proc.id);
		expect(rows.map((c) => c.state)).toEqual(['superseded', 'active']);
		expect(Number(rows[1].previous_id)).toBe(certB.certificateId);
		// The renewed certificate rests on C, so the same run again leaves it alone.
		await runCertificateLifecycle(inGrace);
		expect((await certificateRows(onB.id, proc.id))[1].state).toBe('active');
	});
});

describe('the issued certificate PDF', () => {
	it('is stored at issue, prints the holder in Vietnamese and CJK, and its QR opens the verify URL', async () => {
		const dir = await mkdtemp(path.join(tmpdir(), 'padbridge-issued-'));
		try {
			const s = await setup({ practical: false, check: false });
			const op = await createTestPerson({
				roles: ['operator'],
				displayName: 'Đỗ Thị Ngọc Ánh / 李娜'
			});
			await acknowledge(op.id, s.ins.revisionIds[0]);
			const r = await evaluateAndIssue(op.id, s.proc.id);
			const [cert] = await certificateRows(op.id, s.proc.id);
			const bytes = new Uint8Array(
				await new Response(await getObjectStream(cert.pdf_key!)).arrayBuffer()
			);
			const read = await readPdf(bytes, dir, 'issued');
			expect(read.text).toContain(op.displayName);
			expect(read.text).toContain(r.number!);
			expect(read.text).toContain(s.ins.docNumber);
			const zone = 'Asia/Ho_Chi_Minh';
			expect(read.text).toContain(`${localDate(cert.issued_at, zone)} (${zone}, GMT+7)`);
			expect(read.text).toContain(`${localDate(cert.expires_at, zone)} (${zone}, GMT+7)`);
			expect(await ocrLine(read.namePngPath, 'vie+chi_sim')).toBe(op.displayName);

			const url = await decodeQr(read.pngPath);
			expect(url).toMatch(new RegExp(`^${config.publicUrl}/verify/[A-Za-z0-9_-]{43}$`));
			const token = url!.split('/').at(-1)!;
			const [row] = await queryRows<{ verify_token_hash: string }>(
				appDb(),
				'SELECT verify_token_hash FROM certificates WHERE id = ?',
				[r.certificateId]
			);
			expect(createHash('sha256').update(token).digest('hex')).toBe(row.verify_token_hash);

			// A lost file is made again on demand, with a fresh token (the old one only lived in it).
			await appDb().query('UPDATE certificates SET pdf_key = NULL WHERE id = ?', [r.certificateId]);
			const key = await ensureCertificatePdf(r.certificateId!);
			expect(key).not.toBe(cert.pdf_key);
			const [after] = await queryRows<{ verify_token_hash: string }>(
				appDb(),
				'SELECT verify_token_hash FROM certificates WHERE id = ?',
				[r.certificateId]
			);
			expect(after.verify_token_hash).not.toBe(row.verify_token_hash);
		} finally {
			await rm(dir, { recursive: true, force: true });
		}
	});
});

describe('job leases', () => {
	it('lets one holder run a job per lease window', async () => {
		const name = `test-lease-${Date.now()}`;
		const t = new Date();
		const results = await Promise.all(
			['a', 'b', 'c', 'd'].map((h) => takeLease(name, 60_000, t, h))
		);
		expect(results.filter(Boolean)).toHaveLength(1);
		expect(await takeLease(name, 60_000, new Date(t.getTime() + 59_000), 'e')).toBe(false);
		expect(await takeLease(name, 60_000, new Date(t.getTime() + 60_000), 'e')).toBe(true);
	});
});
