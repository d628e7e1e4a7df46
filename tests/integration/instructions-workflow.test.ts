// The revision workflow against the real MariaDB: effective instants, segregation of duties,
// e-signature checks and races.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { and, count, eq } from 'drizzle-orm';
import { db } from '../../src/lib/server/db/index';
import {
	auditEvents,
	revisions,
	searchEpoch,
	signatureFailures,
	signatures
} from '../../src/lib/server/db/schema/index';
import {
	createNextRevision,
	signRevision,
	submitRevision,
	withdrawInstruction
} from '../../src/lib/server/instructions/workflow';
import { InstructionError } from '../../src/lib/server/instructions/errors';
import { Refusal } from '../../src/lib/server/errors';
import { displayStatus } from '../../src/lib/server/instructions/effective';
import { getRevision, loadEffectiveRevisions } from '../../src/lib/server/instructions/queries';
import { verifyRevisionSignatures } from '../../src/lib/server/instructions/signatures';
import { localDate, zonedToUtc } from '../../src/lib/time';
import {
	PLANT_ZONE,
	approveAt,
	createTestPerson,
	makeInstruction,
	ownerConnection,
	type TestPerson
} from '../helpers/instruction-fixtures';

let trainer: TestPerson;
let quality: TestPerson;
let quality2: TestPerson;
let authorQuality: TestPerson;

beforeAll(async () => {
	trainer = await createTestPerson(['trainer']);
	quality = await createTestPerson(['quality']);
	quality2 = await createTestPerson(['quality']);
	authorQuality = await createTestPerson(['trainer', 'quality']);
});

const effectiveLetter = async (instructionId: number, at: Date) =>
	(await loadEffectiveRevisions(at, [instructionId])).get(instructionId)?.letter ?? null;

const auditCount = async (action: string, entityId: number) =>
	(
		await db
			.select({ n: count() })
			.from(auditEvents)
			.where(and(eq(auditEvents.action, action), eq(auditEvents.entityId, String(entityId))))
	)[0].n;

describe('effective revision at an instant', () => {
	it('switches exactly at 06:00 plant time: one second before is B, at and after is C', async () => {
		const tomorrow = localDate(new Date(Date.now() + 86_400_000), PLANT_ZONE);
		const switchAt = zonedToUtc(tomorrow, '06:00', PLANT_ZONE);
		const fx = await makeInstruction(trainer, quality, [
			{ source: '# A\n\n1. first' },
			{ source: '# B\n\n1. second' },
			{ source: '# C\n\n1. third', stop: 'review' }
		]);
		const cId = fx.revisionIds[2];
		await signRevision(quality.actor, cId, {
			password: quality.password,
			meaning: 'approved',
			effectiveDate: tomorrow,
			effectiveTime: '06:00',
			timeZone: PLANT_ZONE
		});
		const [c] = await db.select().from(revisions).where(eq(revisions.id, cId));
		// Asia/Ho_Chi_Minh is UTC+7 all year (no DST): 06:00 local is 23:00 UTC the day before.
		expect(c.effectiveFrom?.toISOString()).toBe(switchAt.toISOString());
		expect(switchAt.getUTCHours()).toBe(23);

		const before = new Date(switchAt.getTime() - 1000);
		const after = new Date(switchAt.getTime() + 1000);
		expect(await effectiveLetter(fx.instructionId, before)).toBe('B');
		expect(await effectiveLetter(fx.instructionId, switchAt)).toBe('C');
		expect(await effectiveLetter(fx.instructionId, after)).toBe('C');
		// Approval does not show C early: now (before tomorrow 06:00) it is still B.
		expect(await effectiveLetter(fx.instructionId, new Date())).toBe('B');

		const b = await db.select().from(revisions).where(eq(revisions.id, fx.revisionIds[1]));
		expect(displayStatus(b[0], null, before)).toBe('superseded');
		const effBefore = (await loadEffectiveRevisions(before, [fx.instructionId])).get(
			fx.instructionId
		)!;
		expect(displayStatus(c, effBefore.id, before)).toBe('scheduled');
		const effAfter = (await loadEffectiveRevisions(after, [fx.instructionId])).get(
			fx.instructionId
		)!;
		expect(displayStatus(c, effAfter.id, after)).toBe('effective');
		expect(displayStatus(b[0], effAfter.id, after)).toBe('superseded');
	});

	it('is exact across the spring DST change in Europe/Berlin', async () => {
		// 2027-03-28: clocks go from 02:00 CET to 03:00 CEST; 03:00 CEST is 01:00 UTC.
		const fx = await makeInstruction(trainer, quality, [
			{ source: '# A', effectiveFrom: new Date('2027-03-01T00:00:00Z') },
			{ source: '# B', stop: 'review' }
		]);
		await signRevision(
			quality.actor,
			fx.revisionIds[1],
			{
				password: quality.password,
				meaning: 'approved',
				effectiveDate: '2027-03-28',
				effectiveTime: '03:00',
				timeZone: 'Europe/Berlin'
			},
			new Date('2027-03-20T00:00:00Z')
		);
		const t = new Date('2027-03-28T01:00:00Z');
		expect(await effectiveLetter(fx.instructionId, new Date(t.getTime() - 1000))).toBe('A');
		expect(await effectiveLetter(fx.instructionId, t)).toBe('B');
		expect(await effectiveLetter(fx.instructionId, new Date(t.getTime() + 1000))).toBe('B');
		// Local 02:59:59 does not exist that day; one second before the switch is 01:59:59 CET.
		expect(zonedToUtc('2027-03-28', '01:59:59', 'Europe/Berlin').toISOString()).toBe(
			'2027-03-28T00:59:59.000Z'
		);
	});

	it('is exact across the autumn DST change in Europe/Berlin', async () => {
		// 2027-10-31: 03:00 CEST falls back to 02:00 CET; 06:00 CET is 05:00 UTC.
		const fx = await makeInstruction(trainer, quality, [
			{ source: '# A', effectiveFrom: new Date('2027-10-01T00:00:00Z') },
			{ source: '# B', stop: 'review' }
		]);
		await signRevision(
			quality.actor,
			fx.revisionIds[1],
			{
				password: quality.password,
				meaning: 'approved',
				effectiveDate: '2027-10-31',
				effectiveTime: '06:00',
				timeZone: 'Europe/Berlin'
			},
			new Date('2027-10-20T00:00:00Z')
		);
		const t = new Date('2027-10-31T05:00:00Z');
		expect(await effectiveLetter(fx.instructionId, new Date(t.getTime() - 1000))).toBe('A');
		expect(await effectiveLetter(fx.instructionId, t)).toBe('B');
	});

	it('has nothing in force once withdrawn, and tells other instances', async () => {
		const fx = await makeInstruction(trainer, quality, [{ source: '# A' }]);
		const epoch = async () => (await db.select().from(searchEpoch))[0]?.epoch ?? 0;
		const before = await epoch();
		expect(await effectiveLetter(fx.instructionId, new Date())).toBe('A');
		await withdrawInstruction(quality.actor, fx.instructionId, 'Process retired');
		expect(await effectiveLetter(fx.instructionId, new Date())).toBeNull();
		expect(await epoch()).toBe(before + 1);
		const [row] = await db
			.select({ n: count() })
			.from(auditEvents)
			.where(
				and(eq(auditEvents.action, 'instruction.withdrawn'), eq(auditEvents.entityId, fx.docNumber))
			);
		expect(row.n).toBe(1);
	});

	it('refuses an effective instant in the past', async () => {
		const fx = await makeInstruction(trainer, quality, [{ source: '# A', stop: 'review' }]);
		await expect(
			signRevision(quality.actor, fx.revisionIds[0], {
				password: quality.password,
				meaning: 'approved',
				effectiveDate: '2020-01-01',
				effectiveTime: '06:00',
				timeZone: PLANT_ZONE
			})
		).rejects.toMatchObject({ status: 400 });
	});
});

describe('segregation of duties and the signature ceremony', () => {
	it('refuses self-approval server-side, audits it, and changes nothing', async () => {
		const fx = await makeInstruction(authorQuality, quality, [
			{ source: '# Mine', stop: 'review' }
		]);
		const id = fx.revisionIds[0];
		const err = await signRevision(authorQuality.actor, id, {
			password: authorQuality.password,
			meaning: 'approved',
			timeZone: PLANT_ZONE
		}).catch((e) => e);
		expect(err).toBeInstanceOf(InstructionError);
		expect(err.status).toBe(403);
		const [r] = await db.select().from(revisions).where(eq(revisions.id, id));
		expect(r.state).toBe('in_review');
		expect(r.effectiveFrom).toBeNull();
		expect(await auditCount('revision.self_approval_refused', id)).toBe(1);
		const sigs = await db.select().from(signatures).where(eq(signatures.recordId, id));
		expect(sigs).toHaveLength(0);
	});

	it('refuses a wrong password, counts and audits failures, and raises an alert at the third', async () => {
		const signer = await createTestPerson(['quality']);
		const fx = await makeInstruction(trainer, quality, [{ source: '# Pw', stop: 'review' }]);
		const id = fx.revisionIds[0];
		for (let k = 0; k < 3; k++) {
			const err = await signRevision(signer.actor, id, {
				password: 'not-my-password',
				meaning: 'approved',
				timeZone: PLANT_ZONE
			}).catch((e) => e);
			expect(err).toBeInstanceOf(Refusal);
			expect(err.status).toBe(400);
			expect(err.fields?.password).toBeTruthy();
		}
		const [{ n }] = await db
			.select({ n: count() })
			.from(signatureFailures)
			.where(eq(signatureFailures.personId, signer.id));
		expect(n).toBe(3);
		expect(await auditCount('signature.failed', id)).toBe(2);
		expect(await auditCount('signature.failures_alert', id)).toBe(1);
		const [r] = await db.select().from(revisions).where(eq(revisions.id, id));
		expect(r.state).toBe('in_review');
		// The right password still works after failures below the lock limit.
		await signRevision(signer.actor, id, {
			password: signer.password,
			meaning: 'reviewed',
			timeZone: PLANT_ZONE
		});
		const sigs = await verifyRevisionSignatures(id);
		expect(sigs.map((s) => [s.meaning, s.printedName, s.valid])).toEqual([
			['reviewed', signer.displayName, true]
		]);
	});

	it('flags a signature as invalid after the record is changed in the database', async () => {
		const fx = await makeInstruction(trainer, quality, [{ source: '# Bound\n\n1. exact text' }]);
		const id = fx.revisionIds[0];
		expect((await verifyRevisionSignatures(id)).every((s) => s.valid)).toBe(true);
		const owner = await ownerConnection();
		try {
			await owner.query('UPDATE revisions SET source = ? WHERE id = ?', [
				'# Bound\n\n1. altered text',
				id
			]);
			const after = await verifyRevisionSignatures(id);
			expect(after).toHaveLength(1);
			expect(after[0].valid).toBe(false);
			expect(after[0].problem).toMatch(/record altered since signing/);

			// A signature row copied onto another revision does not verify there either.
			const other = await makeInstruction(trainer, quality, [
				{ source: '# Other', stop: 'review' }
			]);
			await owner.query(
				`INSERT INTO signatures (record_type, record_id, signer_id, printed_name, meaning, signed_at, content_hash, binding_hash)
				 SELECT record_type, ?, signer_id, printed_name, meaning, signed_at, content_hash, binding_hash FROM signatures WHERE record_id = ?`,
				[other.revisionIds[0], id]
			);
			const copied = await verifyRevisionSignatures(other.revisionIds[0]);
			expect(copied).toHaveLength(1);
			expect(copied[0].valid).toBe(false);
			expect(copied[0].problem).toMatch(/does not belong to this record/);
		} finally {
			await owner.end();
		}
	});

	it('keeps signatures append-only for the app user', async () => {
		const denied = (e: unknown) =>
			/command denied/i.test(String((e as { cause?: { message?: string } }).cause?.message));
		const upd = await db
			.update(signatures)
			.set({ printedName: 'someone else' })
			.where(eq(signatures.signerId, quality.id))
			.catch((e) => e);
		expect(denied(upd)).toBe(true);
		const del = await db
			.delete(signatures)
			.where(eq(signatures.signerId, quality.id))
			.catch((e) => e);
		expect(denied(del)).toBe(true);
	});
});

describe('races', () => {
	it('lets exactly one of 20 parallel approvals through, leaving one effective revision', async () => {
		const fx = await makeInstruction(trainer, quality, [
			{ source: '# A' },
			{ source: '# B', stop: 'review' }
		]);
		const id = fx.revisionIds[1];
		const results = await Promise.allSettled(
			Array.from({ length: 20 }, (_, k) => approveAt(k % 2 ? quality : quality2, id, new Date()))
		);
		const ok = results.filter((r) => r.status === 'fulfilled');
		const refused = results.filter((r) => r.status === 'rejected');
		expect(ok).toHaveLength(1);
		expect(refused).toHaveLength(19);
		for (const r of refused)
			expect((r as PromiseRejectedResult).reason).toMatchObject({ status: 409 });
		const sigs = await db
			.select()
			.from(signatures)
			.where(and(eq(signatures.recordId, id), eq(signatures.meaning, 'approved')));
		expect(sigs).toHaveLength(1);
		expect(await auditCount('revision.approved', id)).toBe(1);
		expect(await effectiveLetter(fx.instructionId, new Date())).toBe('B');
		const approved = await db
			.select()
			.from(revisions)
			.where(and(eq(revisions.instructionId, fx.instructionId), eq(revisions.state, 'approved')));
		expect(approved).toHaveLength(2);
	});

	it('opens exactly one next revision from 20 parallel requests', async () => {
		const fx = await makeInstruction(trainer, quality, [{ source: '# A' }]);
		const results = await Promise.allSettled(
			Array.from({ length: 20 }, () => createNextRevision(trainer.actor, fx.instructionId))
		);
		expect(results.filter((r) => r.status === 'fulfilled')).toHaveLength(1);
		for (const r of results.filter((x) => x.status === 'rejected'))
			expect((r as PromiseRejectedResult).reason).toMatchObject({ status: 409 });
		const all = await db
			.select()
			.from(revisions)
			.where(eq(revisions.instructionId, fx.instructionId));
		expect(all.map((r) => r.letter).sort()).toEqual(['A', 'B']);
		const [{ n }] = await db
			.select({ n: count() })
			.from(auditEvents)
			.where(eq(auditEvents.action, 'revision.created'));
		expect(n).toBeGreaterThan(0);
	});

	it('rejects a submit against a stale version and keeps the draft', async () => {
		const fx = await makeInstruction(trainer, quality, [{ source: '# A', stop: 'draft' }]);
		const rev = (await getRevision(fx.instructionId, 'A'))!;
		await expect(
			submitRevision(trainer.actor, rev.id, {
				version: rev.version - 1,
				changeSummary: 's',
				reason: 'r',
				classification: 'editorial'
			})
		).rejects.toMatchObject({ status: 409 });
		expect((await getRevision(fx.instructionId, 'A'))!.state).toBe('draft');
	});
});

afterAll(async () => {
	// The pool is shared with other files in this worker; leave it open.
});
