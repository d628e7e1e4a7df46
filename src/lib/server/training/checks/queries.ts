// Reading knowledge checks for the authoring and review pages (trainers and quality only: these
// rows carry answer keys, so no operator page may call them).
import { and, asc, desc, eq, inArray } from 'drizzle-orm';
import { alias } from 'drizzle-orm/mysql-core';
import { db } from '../../db';
import {
	checkQuestions,
	checkVersions,
	instructions,
	knowledgeChecks,
	people,
	processes,
	revisions,
	signatures
} from '../../db/schema';
import { computeBindingHash } from '../../instructions/hash';
import type { QuestionData } from '../../../training/checks/question';
import { CHECK_SIGNATURE_RECORD_TYPE, computeVersionHash } from './hash';

/** Roles that write knowledge checks, and roles that approve them. */
export const CHECK_AUTHOR_ROLES = ['trainer'] as const;
export const CHECK_APPROVER_ROLES = ['quality'] as const;
export const CHECK_VIEWER_ROLES = ['trainer', 'quality'] as const;

/** The register: each check with its process and the state of its newest versions. */
export async function listChecks() {
	const checks = await db
		.select({
			id: knowledgeChecks.id,
			code: knowledgeChecks.code,
			title: knowledgeChecks.title,
			processCode: processes.code,
			processName: processes.name
		})
		.from(knowledgeChecks)
		.innerJoin(processes, eq(processes.id, knowledgeChecks.processId))
		.orderBy(asc(knowledgeChecks.code));
	if (!checks.length) return [];
	const versions = await db
		.select({
			checkId: checkVersions.checkId,
			version: checkVersions.version,
			state: checkVersions.state
		})
		.from(checkVersions)
		.where(
			inArray(
				checkVersions.checkId,
				checks.map((c) => c.id)
			)
		)
		.orderBy(desc(checkVersions.version));
	return checks.map((c) => {
		const mine = versions.filter((v) => v.checkId === c.id);
		return {
			...c,
			approvedVersion: mine.find((v) => v.state === 'approved')?.version ?? null,
			openVersion: mine.find((v) => v.state === 'draft' || v.state === 'in_review') ?? null
		};
	});
}

export async function listProcessChoices() {
	return db
		.select({ id: processes.id, code: processes.code, name: processes.name })
		.from(processes)
		.where(eq(processes.active, true))
		.orderBy(asc(processes.code));
}

/** Approved revisions of the instructions of a process, for "written against revision …". */
export async function listRevisionChoices(processId: number) {
	return db
		.select({ id: revisions.id, docNumber: instructions.docNumber, letter: revisions.letter })
		.from(revisions)
		.innerJoin(instructions, eq(instructions.id, revisions.instructionId))
		.where(
			and(
				eq(instructions.processId, processId),
				inArray(revisions.state, ['approved', 'superseded'])
			)
		)
		.orderBy(asc(instructions.docNumber), asc(revisions.letter));
}

/** One check with its versions (newest first), or null. */
export async function getCheck(checkId: number) {
	const author = alias(people, 'author');
	const approver = alias(people, 'approver');
	const [check] = await db
		.select({
			id: knowledgeChecks.id,
			code: knowledgeChecks.code,
			title: knowledgeChecks.title,
			processId: knowledgeChecks.processId,
			processCode: processes.code,
			processName: processes.name
		})
		.from(knowledgeChecks)
		.innerJoin(processes, eq(processes.id, knowledgeChecks.processId))
		.where(eq(knowledgeChecks.id, checkId));
	if (!check) return null;
	const versions = await db
		.select({
			id: checkVersions.id,
			version: checkVersions.version,
			state: checkVersions.state,
			questionsPerAttempt: checkVersions.questionsPerAttempt,
			authorName: author.displayName,
			approverName: approver.displayName,
			approvedAt: checkVersions.approvedAt,
			submittedAt: checkVersions.submittedAt
		})
		.from(checkVersions)
		.innerJoin(author, eq(author.id, checkVersions.authorId))
		.leftJoin(approver, eq(approver.id, checkVersions.approvedBy))
		.where(eq(checkVersions.checkId, checkId))
		.orderBy(desc(checkVersions.version));
	return { ...check, versions };
}

export interface PoolQuestion extends QuestionData {
	id: number;
	position: number;
}

/** A version with its settings and whole pool (answer keys included: authoring pages only). */
export async function getVersion(checkId: number, versionId: number) {
	const author = alias(people, 'author');
	const [v] = await db
		.select({
			id: checkVersions.id,
			checkId: checkVersions.checkId,
			version: checkVersions.version,
			state: checkVersions.state,
			questionsPerAttempt: checkVersions.questionsPerAttempt,
			timeLimitMin: checkVersions.timeLimitMin,
			attemptsBeforeCooldown: checkVersions.attemptsBeforeCooldown,
			cooldownMin: checkVersions.cooldownMin,
			revisionId: checkVersions.revisionId,
			authorId: checkVersions.authorId,
			authorName: author.displayName,
			submittedAt: checkVersions.submittedAt,
			approvedAt: checkVersions.approvedAt,
			contentHash: checkVersions.contentHash
		})
		.from(checkVersions)
		.innerJoin(author, eq(author.id, checkVersions.authorId))
		.where(and(eq(checkVersions.id, versionId), eq(checkVersions.checkId, checkId)));
	if (!v) return null;
	const rows = await db
		.select()
		.from(checkQuestions)
		.where(eq(checkQuestions.checkVersionId, versionId))
		.orderBy(asc(checkQuestions.position), asc(checkQuestions.id));
	const questions: PoolQuestion[] = rows.map((q) => ({
		id: q.id,
		position: q.position,
		kind: q.kind,
		prompt: q.prompt,
		explanation: q.explanation,
		points: q.points,
		choices: q.choices ?? null,
		answerKey: (q.answerKey ?? null) as QuestionData['answerKey'],
		calc: (q.calc ?? null) as unknown as QuestionData['calc']
	}));
	return { ...v, questions };
}

/** Every signature on a version, each checked against the version as it is now. */
export async function verifyVersionSignatures(versionId: number) {
	const rows = await db
		.select()
		.from(signatures)
		.where(
			and(
				eq(signatures.recordType, CHECK_SIGNATURE_RECORD_TYPE),
				eq(signatures.recordId, versionId)
			)
		)
		.orderBy(asc(signatures.signedAt));
	if (!rows.length) return [];
	const current = await computeVersionHash(versionId);
	return rows.map((s) => {
		let problem: string | null = null;
		if (computeBindingHash(s) !== s.bindingHash)
			problem = 'Signature invalid: it does not belong to this record.';
		else if (s.contentHash !== current)
			problem = 'Signature invalid: the version was altered after signing.';
		return {
			printedName: s.printedName,
			meaning: s.meaning,
			signedAt: s.signedAt,
			valid: problem === null,
			problem
		};
	});
}
