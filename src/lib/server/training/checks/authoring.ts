// Authoring of knowledge checks: the register, versions, the question pool, review and approval
// with an electronic signature. Every change runs in one transaction with its audit event.
import { and, desc, eq, max, ne, sql } from 'drizzle-orm';
import { db, type Tx } from '../../db';
import { checkQuestions, checkVersions, knowledgeChecks, processes } from '../../db/schema';
import { recordAudit, recordAuditNow, type Actor } from '../../audit';
import { reauthenticate } from '../../auth/reauth';
import { Refusal, isDuplicateKey } from '../../errors';
import { insertSignature } from '../../instructions/signatures';
import type { NewCheck, VersionSettings } from '../../../schemas/checks';
import type { QuestionData } from '../../../training/checks/question';
import { CHECK_SIGNATURE_RECORD_TYPE, computeVersionHash } from './hash';

type SignedActor = Actor & { id: number };

const affected = (res: unknown) => (res as [{ affectedRows: number }])[0].affectedRows;

export const DEFAULT_SETTINGS = {
	questionsPerAttempt: 5,
	timeLimitMin: null,
	attemptsBeforeCooldown: 2,
	cooldownMin: 60,
	revisionId: null
} satisfies VersionSettings;

/** Registers a knowledge check with an empty draft version 1. */
export async function createCheck(actor: SignedActor, input: NewCheck) {
	const [proc] = await db
		.select({ id: processes.id, code: processes.code })
		.from(processes)
		.where(eq(processes.id, input.processId));
	if (!proc) throw new Refusal(400, 'Choose a process.', { processId: 'No such process.' });
	try {
		return await db.transaction(async (tx) => {
			const [{ id }] = await tx
				.insert(knowledgeChecks)
				.values({ code: input.code, title: input.title, processId: proc.id, ownerId: actor.id })
				.$returningId();
			const [{ id: versionId }] = await tx
				.insert(checkVersions)
				.values({ checkId: id, version: 1, authorId: actor.id, ...DEFAULT_SETTINGS })
				.$returningId();
			await recordAudit(tx, actor, {
				action: 'check.created',
				entityType: 'knowledge_check',
				entityId: id,
				newValues: { code: input.code, title: input.title, process: proc.code, versionId }
			});
			return { id, versionId };
		});
	} catch (err) {
		if (isDuplicateKey(err))
			throw new Refusal(409, 'That check code is already registered.', {
				code: `${input.code} already exists.`
			});
		throw err;
	}
}

async function lockVersion(tx: Tx, versionId: number) {
	const [v] = await tx
		.select({
			id: checkVersions.id,
			checkId: checkVersions.checkId,
			version: checkVersions.version,
			state: checkVersions.state,
			authorId: checkVersions.authorId,
			questionsPerAttempt: checkVersions.questionsPerAttempt,
			code: knowledgeChecks.code
		})
		.from(checkVersions)
		.innerJoin(knowledgeChecks, eq(knowledgeChecks.id, checkVersions.checkId))
		.where(eq(checkVersions.id, versionId))
		.for('update');
	if (!v) throw new Refusal(404, 'No such knowledge check version.');
	return v;
}

async function lockDraft(tx: Tx, versionId: number) {
	const v = await lockVersion(tx, versionId);
	if (v.state !== 'draft')
		throw new Refusal(
			409,
			`Version ${v.version} of ${v.code} is ${v.state.replace('_', ' ')}; only a draft can be changed.`
		);
	return v;
}

/**
 * Opens the next version as a draft copied from the newest one (settings and pool). The check row
 * is locked and (check, version) is unique, so parallel calls open one.
 */
export async function createNextVersion(actor: SignedActor, checkId: number) {
	return db.transaction(async (tx) => {
		const [check] = await tx
			.select({ id: knowledgeChecks.id, code: knowledgeChecks.code })
			.from(knowledgeChecks)
			.where(eq(knowledgeChecks.id, checkId))
			.for('update');
		if (!check) throw new Refusal(404, 'No such knowledge check.');
		const versions = await tx
			.select()
			.from(checkVersions)
			.where(eq(checkVersions.checkId, checkId))
			.orderBy(desc(checkVersions.version));
		const open = versions.find((v) => v.state === 'draft' || v.state === 'in_review');
		if (open)
			throw new Refusal(
				409,
				`Version ${open.version} is still ${open.state === 'draft' ? 'a draft' : 'in review'}; finish it first.`
			);
		const base = versions[0];
		const version = (base?.version ?? 0) + 1;
		const [{ id }] = await tx
			.insert(checkVersions)
			.values({
				checkId,
				version,
				authorId: actor.id,
				questionsPerAttempt: base?.questionsPerAttempt ?? DEFAULT_SETTINGS.questionsPerAttempt,
				timeLimitMin: base?.timeLimitMin ?? null,
				attemptsBeforeCooldown:
					base?.attemptsBeforeCooldown ?? DEFAULT_SETTINGS.attemptsBeforeCooldown,
				cooldownMin: base?.cooldownMin ?? DEFAULT_SETTINGS.cooldownMin,
				revisionId: base?.revisionId ?? null
			})
			.$returningId();
		let copied = 0;
		if (base) {
			const pool = await tx
				.select()
				.from(checkQuestions)
				.where(eq(checkQuestions.checkVersionId, base.id));
			for (const { id: _id, checkVersionId: _v, ...q } of pool) {
				await tx.insert(checkQuestions).values({ ...q, checkVersionId: id });
				copied++;
			}
		}
		await recordAudit(tx, actor, {
			action: 'check_version.created',
			entityType: 'check_version',
			entityId: id,
			newValues: { code: check.code, version, basedOn: base?.version ?? null, questions: copied }
		});
		return { id, version };
	});
}

/** Changes a draft's settings. */
export async function updateVersionSettings(
	actor: SignedActor,
	versionId: number,
	settings: VersionSettings
) {
	return db.transaction(async (tx) => {
		const v = await lockDraft(tx, versionId);
		const [old] = await tx
			.select({
				questionsPerAttempt: checkVersions.questionsPerAttempt,
				timeLimitMin: checkVersions.timeLimitMin,
				attemptsBeforeCooldown: checkVersions.attemptsBeforeCooldown,
				cooldownMin: checkVersions.cooldownMin,
				revisionId: checkVersions.revisionId
			})
			.from(checkVersions)
			.where(eq(checkVersions.id, versionId));
		await tx
			.update(checkVersions)
			.set({ ...settings, updatedAt: new Date() })
			.where(eq(checkVersions.id, versionId));
		await recordAudit(tx, actor, {
			action: 'check_version.settings_changed',
			entityType: 'check_version',
			entityId: versionId,
			oldValues: old,
			newValues: { code: v.code, version: v.version, ...settings }
		});
	});
}

const questionRow = (q: QuestionData) => ({
	kind: q.kind,
	prompt: q.prompt,
	explanation: q.explanation,
	points: q.points,
	choices: q.choices,
	answerKey: q.answerKey as Record<string, unknown> | null,
	calc: q.calc as unknown as Record<string, unknown> | null
});

/** Adds a question to a draft's pool (questionId null) or changes one. */
export async function saveQuestion(
	actor: SignedActor,
	versionId: number,
	questionId: number | null,
	q: QuestionData
) {
	return db.transaction(async (tx) => {
		const v = await lockDraft(tx, versionId);
		if (questionId === null) {
			const [{ last }] = await tx
				.select({ last: max(checkQuestions.position) })
				.from(checkQuestions)
				.where(eq(checkQuestions.checkVersionId, versionId));
			const position = (last ?? 0) + 1;
			const [{ id }] = await tx
				.insert(checkQuestions)
				.values({ checkVersionId: versionId, position, ...questionRow(q) })
				.$returningId();
			await recordAudit(tx, actor, {
				action: 'check_question.added',
				entityType: 'check_question',
				entityId: id,
				newValues: { code: v.code, version: v.version, position, ...questionRow(q) }
			});
			return { id };
		}
		const [old] = await tx
			.select()
			.from(checkQuestions)
			.where(and(eq(checkQuestions.id, questionId), eq(checkQuestions.checkVersionId, versionId)));
		if (!old) throw new Refusal(404, 'No such question in this version.');
		await tx.update(checkQuestions).set(questionRow(q)).where(eq(checkQuestions.id, questionId));
		await recordAudit(tx, actor, {
			action: 'check_question.changed',
			entityType: 'check_question',
			entityId: questionId,
			oldValues: questionRow(old as unknown as QuestionData),
			newValues: { code: v.code, version: v.version, ...questionRow(q) }
		});
		return { id: questionId };
	});
}

/** Takes a question out of a draft's pool. */
export async function removeQuestion(actor: SignedActor, versionId: number, questionId: number) {
	return db.transaction(async (tx) => {
		const v = await lockDraft(tx, versionId);
		const [old] = await tx
			.select()
			.from(checkQuestions)
			.where(and(eq(checkQuestions.id, questionId), eq(checkQuestions.checkVersionId, versionId)));
		if (!old) throw new Refusal(404, 'No such question in this version.');
		await tx.delete(checkQuestions).where(eq(checkQuestions.id, questionId));
		await recordAudit(tx, actor, {
			action: 'check_question.removed',
			entityType: 'check_question',
			entityId: questionId,
			oldValues: { code: v.code, version: v.version, position: old.position, prompt: old.prompt }
		});
	});
}

/** Sends a draft to quality for review; the pool must hold enough questions for an attempt. */
export async function submitVersion(actor: SignedActor, versionId: number) {
	return db.transaction(async (tx) => {
		const v = await lockDraft(tx, versionId);
		const [{ n }] = await tx
			.select({ n: sql<number>`count(*)` })
			.from(checkQuestions)
			.where(eq(checkQuestions.checkVersionId, versionId));
		if (Number(n) < v.questionsPerAttempt)
			throw new Refusal(
				409,
				`The pool holds ${n} question${Number(n) === 1 ? '' : 's'}, fewer than the ${v.questionsPerAttempt} each attempt draws. Add questions or lower the number per attempt.`
			);
		const contentHash = await computeVersionHash(versionId, tx);
		await tx
			.update(checkVersions)
			.set({ state: 'in_review', submittedAt: new Date(), contentHash, updatedAt: new Date() })
			.where(eq(checkVersions.id, versionId));
		await recordAudit(tx, actor, {
			action: 'check_version.submitted',
			entityType: 'check_version',
			entityId: versionId,
			oldValues: { state: 'draft' },
			newValues: {
				state: 'in_review',
				code: v.code,
				version: v.version,
				contentHash,
				pool: Number(n)
			}
		});
		return { contentHash };
	});
}

/** Sends a version in review back to draft with the reviewer's comment. */
export async function returnVersion(actor: SignedActor, versionId: number, comment: string) {
	return db.transaction(async (tx) => {
		const v = await lockVersion(tx, versionId);
		if (v.state !== 'in_review')
			throw new Refusal(409, 'Only a version in review can be sent back.');
		await tx
			.update(checkVersions)
			.set({ state: 'draft', submittedAt: null, updatedAt: new Date() })
			.where(eq(checkVersions.id, versionId));
		await recordAudit(tx, actor, {
			action: 'check_version.returned',
			entityType: 'check_version',
			entityId: versionId,
			oldValues: { state: 'in_review' },
			newValues: { state: 'draft', code: v.code, version: v.version },
			reason: comment
		});
	});
}

/**
 * Approves a version in review with the approver's electronic signature (password again, meaning
 * "approved", bound to the content hash). The author is refused. The previously approved version
 * of the same check is retired in the same transaction, so exactly one version is approved.
 */
export async function approveVersion(
	actor: SignedActor,
	versionId: number,
	input: { password: string; comment?: string }
) {
	const [v] = await db
		.select({
			id: checkVersions.id,
			version: checkVersions.version,
			state: checkVersions.state,
			authorId: checkVersions.authorId,
			code: knowledgeChecks.code
		})
		.from(checkVersions)
		.innerJoin(knowledgeChecks, eq(knowledgeChecks.id, checkVersions.checkId))
		.where(eq(checkVersions.id, versionId));
	if (!v) throw new Refusal(404, 'No such knowledge check version.');
	const label = `${v.code} v${v.version}`;
	if (v.authorId === actor.id) {
		await recordAuditNow(actor, {
			action: 'check_version.self_approval_refused',
			entityType: 'check_version',
			entityId: versionId,
			newValues: { code: v.code, version: v.version },
			reason: 'the author of a knowledge check version cannot approve it'
		});
		throw new Refusal(403, 'You wrote this version, so you cannot approve it.');
	}
	if (v.state !== 'in_review')
		throw new Refusal(409, `Version ${v.version} is not in review, so it cannot be approved.`);
	const { printedName } = await reauthenticate(actor, input.password, {
		type: CHECK_SIGNATURE_RECORD_TYPE,
		id: versionId,
		label
	});
	return db.transaction(async (tx) => {
		const locked = await lockVersion(tx, versionId);
		if (locked.state !== 'in_review')
			throw new Refusal(409, 'This version was decided by someone else a moment ago.');
		const contentHash = await computeVersionHash(versionId, tx);
		const signedAt = new Date();
		const res = await tx
			.update(checkVersions)
			.set({
				state: 'approved',
				approvedAt: signedAt,
				approvedBy: actor.id,
				contentHash,
				updatedAt: signedAt
			})
			.where(and(eq(checkVersions.id, versionId), eq(checkVersions.state, 'in_review')));
		if (affected(res) !== 1)
			throw new Refusal(409, 'This version was decided by someone else a moment ago.');
		const previous = await tx
			.select({ id: checkVersions.id, version: checkVersions.version })
			.from(checkVersions)
			.where(
				and(
					eq(checkVersions.checkId, locked.checkId),
					eq(checkVersions.state, 'approved'),
					ne(checkVersions.id, versionId)
				)
			);
		if (previous.length)
			await tx
				.update(checkVersions)
				.set({ state: 'retired', updatedAt: signedAt })
				.where(
					and(
						eq(checkVersions.checkId, locked.checkId),
						eq(checkVersions.state, 'approved'),
						ne(checkVersions.id, versionId)
					)
				);
		const sig = await insertSignature(tx, {
			recordType: CHECK_SIGNATURE_RECORD_TYPE,
			recordId: versionId,
			signerId: actor.id,
			printedName,
			meaning: 'approved',
			contentHash,
			signedAt
		});
		await recordAudit(tx, actor, {
			action: 'check_version.approved',
			entityType: 'check_version',
			entityId: versionId,
			oldValues: { state: 'in_review' },
			newValues: {
				state: 'approved',
				code: v.code,
				version: v.version,
				signatureId: sig.id,
				meaning: 'approved',
				contentHash,
				retired: previous.map((p) => p.version)
			},
			reason: input.comment?.trim() || null
		});
		return { signatureId: sig.id, contentHash, retired: previous.map((p) => p.id) };
	});
}
