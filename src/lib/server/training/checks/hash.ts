import { createHash } from 'node:crypto';
import { asc, eq } from 'drizzle-orm';
import { db, type DbOrTx } from '../../db';
import { checkQuestions, checkVersions } from '../../db/schema';
import { canonicalJson } from '../../audit/chain';

/** The record type of knowledge-check version signatures in the signatures table. */
export const CHECK_SIGNATURE_RECORD_TYPE = 'check_version';

/**
 * sha256 over what an approval vouches for: the version's settings and every question of its pool
 * (prompt, choices, key or calculator spec, explanation, points), in pool order.
 */
export async function computeVersionHash(versionId: number, conn: DbOrTx = db): Promise<string> {
	const [v] = await conn
		.select({
			checkId: checkVersions.checkId,
			version: checkVersions.version,
			questionsPerAttempt: checkVersions.questionsPerAttempt,
			timeLimitMin: checkVersions.timeLimitMin,
			attemptsBeforeCooldown: checkVersions.attemptsBeforeCooldown,
			cooldownMin: checkVersions.cooldownMin,
			revisionId: checkVersions.revisionId
		})
		.from(checkVersions)
		.where(eq(checkVersions.id, versionId));
	const questions = await conn
		.select({
			position: checkQuestions.position,
			kind: checkQuestions.kind,
			prompt: checkQuestions.prompt,
			choices: checkQuestions.choices,
			answerKey: checkQuestions.answerKey,
			calc: checkQuestions.calc,
			explanation: checkQuestions.explanation,
			points: checkQuestions.points
		})
		.from(checkQuestions)
		.where(eq(checkQuestions.checkVersionId, versionId))
		.orderBy(asc(checkQuestions.position), asc(checkQuestions.id));
	return createHash('sha256')
		.update(canonicalJson({ settings: v ?? null, questions }), 'utf8')
		.digest('hex');
}
