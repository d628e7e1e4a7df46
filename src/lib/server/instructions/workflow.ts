// State changes of instructions and revisions. Each runs in one transaction with its audit event;
// races are settled by row locks and conditional UPDATEs, never by checks in application code alone.
import { randomUUID } from 'node:crypto';
import { and, desc, eq, sql } from 'drizzle-orm';
import { db, type Tx } from '../db';
import {
	instructionStations,
	instructions,
	people,
	reviewComments,
	revisionFiles,
	revisions,
	searchEpoch
} from '../db/schema';
import { recordAudit, recordAuditNow, type Actor } from '../audit';
import { copyObject } from '../storage';
import { invalidateSearchIndex } from '../search';
import {
	letterToNumber,
	nextRevisionLetter,
	type ChangeClass,
	type SignatureMeaning
} from '../../instructions/vocabulary';
import { zonedToUtc } from '../../time';
import { InstructionError, isDuplicateKey, notFound } from './errors';
import { computeContentHash } from './hash';
import { listRevisionFiles } from './queries';
import { insertSignature, reauthenticateSigner } from './signatures';
import { queueReviewRequestedMail } from '../mail/events';
import { faultPoint } from '../faults';

type SignedActor = Actor & { id: number };

const affected = (res: unknown) => (res as [{ affectedRows: number }])[0].affectedRows;

/**
 * Tells every app instance that instruction text or states changed (search catches up on it).
 * Publications must bump it; drafts and reviews bump it too so the drafts-and-archive scope follows.
 */
export async function bumpSearchEpoch(tx: Tx) {
	await tx
		.insert(searchEpoch)
		.values({ id: 1, epoch: 1, changedAt: new Date() })
		.onDuplicateKeyUpdate({ set: { epoch: sql`${searchEpoch.epoch} + 1`, changedAt: new Date() } });
	invalidateSearchIndex();
}

export interface NewInstruction {
	docNumber: string;
	title: string;
	processId: number | null;
	stationIds: number[];
	reviewDueOn: string | null;
	source: string;
}

/** Registers a new instruction with an empty draft revision A. */
export async function createInstruction(actor: SignedActor, input: NewInstruction) {
	try {
		return await db.transaction(async (tx) => {
			const [{ id }] = await tx
				.insert(instructions)
				.values({
					docNumber: input.docNumber,
					title: input.title,
					processId: input.processId,
					ownerId: actor.id,
					reviewDueOn: input.reviewDueOn
				})
				.$returningId();
			if (input.stationIds.length) {
				await tx
					.insert(instructionStations)
					.values(input.stationIds.map((stationId) => ({ instructionId: id, stationId })));
			}
			const [{ id: revisionId }] = await tx
				.insert(revisions)
				.values({
					instructionId: id,
					letter: 'A',
					source: input.source,
					contentHash: computeContentHash(input.source, []),
					authorId: actor.id,
					lastEditedBy: actor.id
				})
				.$returningId();
			await bumpSearchEpoch(tx);
			await recordAudit(tx, actor, {
				action: 'instruction.created',
				entityType: 'instruction',
				entityId: input.docNumber,
				newValues: { ...input, revision: 'A', revisionId }
			});
			return { id, revisionId, letter: 'A' };
		});
	} catch (err) {
		if (isDuplicateKey(err))
			throw new InstructionError(409, 'That document number is already registered.', {
				docNumber: `${input.docNumber} already exists.`
			});
		throw err;
	}
}

/**
 * Opens the next revision (A → B …) as a draft copied from the newest approved one. The
 * instruction row is locked, and (instruction, letter) is unique, so parallel calls open one.
 */
export async function createNextRevision(actor: SignedActor, instructionId: number) {
	try {
		return await db.transaction(async (tx) => {
			const [inst] = await tx
				.select({
					id: instructions.id,
					docNumber: instructions.docNumber,
					withdrawnAt: instructions.withdrawnAt
				})
				.from(instructions)
				.where(eq(instructions.id, instructionId))
				.for('update');
			if (!inst) throw notFound();
			if (inst.withdrawnAt) throw new InstructionError(409, 'This instruction is withdrawn.');
			const list = await tx
				.select({
					id: revisions.id,
					letter: revisions.letter,
					state: revisions.state,
					source: revisions.source
				})
				.from(revisions)
				.where(eq(revisions.instructionId, instructionId));
			const open = list.find((r) => r.state === 'draft' || r.state === 'in_review');
			if (open) {
				throw new InstructionError(
					409,
					`Revision ${open.letter} is already open (${open.state === 'draft' ? 'draft' : 'in review'}); finish it first.`,
					undefined,
					{ letter: open.letter }
				);
			}
			const sorted = list.sort((a, b) => letterToNumber(b.letter) - letterToNumber(a.letter));
			const letter = nextRevisionLetter(sorted[0]?.letter ?? null);
			const base = sorted.find((r) => r.state === 'approved' || r.state === 'superseded');
			const source = base?.source ?? '';
			const [{ id }] = await tx
				.insert(revisions)
				.values({
					instructionId,
					letter,
					source,
					contentHash: computeContentHash(source, []),
					authorId: actor.id,
					lastEditedBy: actor.id
				})
				.$returningId();
			const copied = base ? await copyRevisionFiles(tx, base.id, id) : [];
			if (copied.length) {
				await tx
					.update(revisions)
					.set({ contentHash: computeContentHash(source, copied) })
					.where(eq(revisions.id, id));
			}
			await bumpSearchEpoch(tx);
			await recordAudit(tx, actor, {
				action: 'revision.created',
				entityType: 'revision',
				entityId: id,
				newValues: {
					docNumber: inst.docNumber,
					letter,
					basedOn: base?.letter ?? null,
					files: copied.length
				}
			});
			return { id, letter, docNumber: inst.docNumber };
		});
	} catch (err) {
		if (isDuplicateKey(err))
			throw new InstructionError(
				409,
				'Another person opened the next revision at the same moment.'
			);
		throw err;
	}
}

/** Gives a new revision its own stored copy of each file of `fromId`. */
async function copyRevisionFiles(tx: Tx, fromId: number, toId: number) {
	const files = await tx.select().from(revisionFiles).where(eq(revisionFiles.revisionId, fromId));
	for (const f of files) {
		const storageKey = `revisions/${toId}/${randomUUID()}.${f.storageKey.split('.').pop()}`;
		await copyObject(f.storageKey, storageKey);
		const { id: _id, createdAt: _c, ...rest } = f;
		await tx.insert(revisionFiles).values({ ...rest, revisionId: toId, storageKey });
	}
	return files;
}

async function lockRevision(tx: Tx, revisionId: number) {
	const [r] = await tx
		.select({
			id: revisions.id,
			instructionId: revisions.instructionId,
			letter: revisions.letter,
			state: revisions.state,
			authorId: revisions.authorId,
			version: revisions.version,
			contentHash: revisions.contentHash,
			docNumber: instructions.docNumber
		})
		.from(revisions)
		.innerJoin(instructions, eq(instructions.id, revisions.instructionId))
		.where(eq(revisions.id, revisionId))
		.for('update');
	if (!r) throw notFound();
	return r;
}

export interface SaveConflict {
	source: string;
	version: number;
	editedBy: string | null;
	updatedAt: Date;
}

/**
 * Saves a draft's Markdown if nobody saved since `version`. A stale version is a 409 carrying the
 * other person's text, so the editor can show both and nothing typed is lost.
 */
export async function saveDraft(
	actor: SignedActor,
	revisionId: number,
	input: { source: string; version: number }
) {
	const result = await db.transaction(async (tx) => {
		const files = await listRevisionFiles(revisionId, tx);
		const contentHash = computeContentHash(input.source, files);
		const res = await tx
			.update(revisions)
			.set({
				source: input.source,
				contentHash,
				version: sql`${revisions.version} + 1`,
				updatedAt: new Date(),
				lastEditedBy: actor.id
			})
			.where(
				and(
					eq(revisions.id, revisionId),
					eq(revisions.version, input.version),
					eq(revisions.state, 'draft')
				)
			);
		if (affected(res) === 1) {
			await bumpSearchEpoch(tx);
			await recordAudit(tx, actor, {
				action: 'revision.draft_saved',
				entityType: 'revision',
				entityId: revisionId,
				oldValues: { version: input.version },
				newValues: { version: input.version + 1, contentHash, length: input.source.length }
			});
			return { ok: true as const, version: input.version + 1, contentHash };
		}
		return { ok: false as const };
	});
	if (result.ok) return result;
	const [cur] = await db
		.select({
			source: revisions.source,
			version: revisions.version,
			state: revisions.state,
			updatedAt: revisions.updatedAt,
			lastEditedBy: revisions.lastEditedBy
		})
		.from(revisions)
		.where(eq(revisions.id, revisionId));
	if (!cur) throw notFound();
	const [editor] = cur.lastEditedBy
		? await db
				.select({ name: people.displayName })
				.from(people)
				.where(eq(people.id, cur.lastEditedBy))
		: [];
	await recordAuditNow(actor, {
		action: 'revision.save_conflict',
		entityType: 'revision',
		entityId: revisionId,
		newValues: {
			attemptedVersion: input.version,
			currentVersion: cur.version,
			attemptedHash: computeContentHash(input.source, []),
			state: cur.state
		},
		reason: cur.state === 'draft' ? 'stale version' : 'revision is no longer a draft'
	});
	if (cur.state !== 'draft') {
		throw new InstructionError(
			409,
			'This revision is no longer a draft; your text was not saved.',
			undefined,
			{
				conflict: {
					source: cur.source,
					version: cur.version,
					editedBy: editor?.name ?? null,
					updatedAt: cur.updatedAt
				}
			}
		);
	}
	throw new InstructionError(
		409,
		`${editor?.name ?? 'Someone'} saved this draft after you opened it. Compare both texts below; nothing you typed is lost.`,
		undefined,
		{
			conflict: {
				source: cur.source,
				version: cur.version,
				editedBy: editor?.name ?? null,
				updatedAt: cur.updatedAt
			} satisfies SaveConflict
		}
	);
}

export interface SubmitInput {
	version: number;
	changeSummary: string;
	reason: string;
	classification: ChangeClass;
}

/** Sends a draft to review with its change record. */
export async function submitRevision(actor: SignedActor, revisionId: number, input: SubmitInput) {
	return db.transaction(async (tx) => {
		const r = await lockRevision(tx, revisionId);
		if (r.state !== 'draft') throw new InstructionError(409, 'Only a draft can be submitted.');
		if (r.version !== input.version)
			throw new InstructionError(
				409,
				'The draft changed since you opened it. Reload, check the text, and submit again.'
			);
		await tx
			.update(revisions)
			.set({
				state: 'in_review',
				changeSummary: input.changeSummary,
				reason: input.reason,
				classification: input.classification,
				submittedAt: new Date(),
				version: sql`${revisions.version} + 1`
			})
			.where(eq(revisions.id, revisionId));
		await bumpSearchEpoch(tx);
		await recordAudit(tx, actor, {
			action: 'revision.submitted',
			entityType: 'revision',
			entityId: revisionId,
			oldValues: { state: 'draft' },
			newValues: {
				state: 'in_review',
				docNumber: r.docNumber,
				letter: r.letter,
				contentHash: r.contentHash,
				changeSummary: input.changeSummary,
				classification: input.classification
			},
			reason: input.reason
		});
		const [meta] = await tx
			.select({ title: instructions.title, author: people.displayName })
			.from(instructions)
			.innerJoin(people, eq(people.id, r.authorId))
			.where(eq(instructions.id, r.instructionId));
		await queueReviewRequestedMail(tx, {
			revisionId,
			version: r.version + 1,
			docNumber: r.docNumber,
			letter: r.letter,
			title: meta.title,
			authorId: r.authorId,
			authorName: meta.author,
			changeSummary: input.changeSummary,
			classification: input.classification
		});
	});
}

export interface SignInput {
	password: string;
	meaning: SignatureMeaning;
	/** Plant-local date and time of the effective instant; empty means at once. */
	effectiveDate?: string;
	effectiveTime?: string;
	timeZone: string;
	comment?: string;
}

/** Refuses (and audits) a signature by the revision's own author. */
async function refuseSelfSignature(
	actor: SignedActor,
	r: { id: number; docNumber: string; letter: string }
) {
	await recordAuditNow(actor, {
		action: 'revision.self_approval_refused',
		entityType: 'revision',
		entityId: r.id,
		newValues: { docNumber: r.docNumber, letter: r.letter },
		reason: 'the author of a revision cannot review or approve it'
	});
	throw new InstructionError(403, 'You wrote this revision, so you cannot review or approve it.');
}

/**
 * Signs a revision in review. Meaning "reviewed" records the review; "approved" also approves it
 * and sets its effective instant. The author is refused; the password is checked again.
 * A conditional UPDATE lets exactly one of many parallel approvals through.
 */
export async function signRevision(
	actor: SignedActor,
	revisionId: number,
	input: SignInput,
	now: Date = new Date()
) {
	const [r] = await db
		.select({
			id: revisions.id,
			letter: revisions.letter,
			state: revisions.state,
			authorId: revisions.authorId,
			docNumber: instructions.docNumber
		})
		.from(revisions)
		.innerJoin(instructions, eq(instructions.id, revisions.instructionId))
		.where(eq(revisions.id, revisionId));
	if (!r) throw notFound();
	if (r.authorId === actor.id) await refuseSelfSignature(actor, r);
	if (r.state !== 'in_review')
		throw new InstructionError(
			409,
			`Revision ${r.letter} is not in review, so it cannot be signed.`
		);

	let effectiveFrom = now;
	if (input.meaning === 'approved' && input.effectiveDate) {
		effectiveFrom = zonedToUtc(input.effectiveDate, input.effectiveTime || '00:00', input.timeZone);
		if (effectiveFrom.getTime() < now.getTime() - 60_000) {
			throw new InstructionError(400, 'The effective date and time is in the past.', {
				effectiveDate: 'Choose now or a later date and time (plant time).'
			});
		}
		if (effectiveFrom.getTime() < now.getTime()) effectiveFrom = now;
	}

	const { printedName } = await reauthenticateSigner(actor, input.password, {
		id: r.id,
		label: `${r.docNumber} rev ${r.letter}`
	});

	const signed = await db.transaction(async (tx) => {
		const locked = await lockRevision(tx, revisionId);
		if (locked.authorId === actor.id) throw new InstructionError(403, 'You wrote this revision.');
		const contentHash = computeContentHash(
			(
				await tx.select({ s: revisions.source }).from(revisions).where(eq(revisions.id, revisionId))
			)[0].s,
			await listRevisionFiles(revisionId, tx)
		);
		const signedAt = new Date();
		if (input.meaning === 'approved') {
			const res = await tx
				.update(revisions)
				.set({
					state: 'approved',
					approvedAt: signedAt,
					approvedBy: actor.id,
					effectiveFrom,
					contentHash,
					version: sql`${revisions.version} + 1`
				})
				.where(and(eq(revisions.id, revisionId), eq(revisions.state, 'in_review')));
			await faultPoint('publish-revision');
			if (affected(res) !== 1)
				throw new InstructionError(409, 'This revision was decided by someone else a moment ago.');
			await bumpSearchEpoch(tx);
		} else if (locked.state !== 'in_review') {
			throw new InstructionError(409, 'This revision is no longer in review.');
		}
		const sig = await insertSignature(tx, {
			recordId: revisionId,
			signerId: actor.id,
			printedName,
			meaning: input.meaning,
			contentHash,
			signedAt
		});
		if (input.comment?.trim()) {
			await tx
				.insert(reviewComments)
				.values({ revisionId, authorId: actor.id, body: input.comment.trim() });
		}
		await recordAudit(tx, actor, {
			action: input.meaning === 'approved' ? 'revision.approved' : 'revision.reviewed',
			entityType: 'revision',
			entityId: revisionId,
			oldValues: { state: 'in_review' },
			newValues: {
				state: input.meaning === 'approved' ? 'approved' : 'in_review',
				docNumber: r.docNumber,
				letter: r.letter,
				signatureId: sig.id,
				meaning: input.meaning,
				contentHash,
				effectiveFrom: input.meaning === 'approved' ? effectiveFrom.toISOString() : null
			}
		});
		return { signatureId: sig.id, effectiveFrom, signedAt, printedName };
	});
	if (input.meaning === 'approved') invalidateSearchIndex();
	return signed;
}

/** Sends a revision in review back to draft with the reviewer's comments. */
export async function rejectRevision(actor: SignedActor, revisionId: number, comment: string) {
	return db.transaction(async (tx) => {
		const r = await lockRevision(tx, revisionId);
		if (r.state !== 'in_review')
			throw new InstructionError(409, 'Only a revision in review can be sent back.');
		await tx
			.update(revisions)
			.set({ state: 'draft', submittedAt: null, version: sql`${revisions.version} + 1` })
			.where(eq(revisions.id, revisionId));
		await tx
			.insert(reviewComments)
			.values({ revisionId, authorId: actor.id, kind: 'rejection', body: comment });
		await bumpSearchEpoch(tx);
		await recordAudit(tx, actor, {
			action: 'revision.rejected',
			entityType: 'revision',
			entityId: revisionId,
			oldValues: { state: 'in_review' },
			newValues: { state: 'draft', docNumber: r.docNumber, letter: r.letter },
			reason: comment
		});
	});
}

/** Adds a review comment without changing state. */
export async function addReviewComment(actor: SignedActor, revisionId: number, body: string) {
	return db.transaction(async (tx) => {
		const r = await lockRevision(tx, revisionId);
		await tx.insert(reviewComments).values({ revisionId, authorId: actor.id, body });
		await recordAudit(tx, actor, {
			action: 'revision.commented',
			entityType: 'revision',
			entityId: revisionId,
			newValues: { docNumber: r.docNumber, letter: r.letter, length: body.length }
		});
	});
}

/** Withdraws an instruction: from now on nothing of it is in force. */
export async function withdrawInstruction(
	actor: SignedActor,
	instructionId: number,
	reason: string
) {
	await db.transaction(async (tx) => {
		const [i] = await tx
			.select({ docNumber: instructions.docNumber, withdrawnAt: instructions.withdrawnAt })
			.from(instructions)
			.where(eq(instructions.id, instructionId))
			.for('update');
		if (!i) throw notFound();
		if (i.withdrawnAt) throw new InstructionError(409, 'Already withdrawn.');
		const at = new Date();
		await tx
			.update(instructions)
			.set({ withdrawnAt: at, withdrawnReason: reason })
			.where(eq(instructions.id, instructionId));
		await bumpSearchEpoch(tx);
		await recordAudit(tx, actor, {
			action: 'instruction.withdrawn',
			entityType: 'instruction',
			entityId: i.docNumber,
			newValues: { withdrawnAt: at.toISOString() },
			reason
		});
	});
	invalidateSearchIndex();
}

/** The newest revision id and letter of an instruction (used by tests and the seed). */
export async function latestRevision(instructionId: number) {
	const [r] = await db
		.select({ id: revisions.id, letter: revisions.letter })
		.from(revisions)
		.where(eq(revisions.instructionId, instructionId))
		.orderBy(desc(revisions.id))
		.limit(1);
	return r ?? null;
}
