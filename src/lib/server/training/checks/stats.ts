// Item statistics of a knowledge check: which questions people miss, from graded attempts.
import { and, eq, ne } from 'drizzle-orm';
import { db } from '../../db';
import { attemptItems, checkAttempts, checkQuestions, checkVersions } from '../../db/schema';
import type { Choice } from '../../../training/checks/question';
import type { QuestionKind } from '../../../training/vocabulary';

export interface ItemStat {
	questionId: number;
	version: number;
	position: number;
	kind: QuestionKind;
	prompt: string;
	drawn: number;
	correct: number;
	pctCorrect: number;
	mostCommonWrong: string | null;
	mostCommonWrongCount: number;
}

/** A response as a trainer reads it: choice texts, a typed number, or "(no answer)". */
export function describeResponse(
	kind: QuestionKind,
	choices: Choice[] | null,
	response: unknown
): string {
	if (response === null || response === undefined || (Array.isArray(response) && !response.length))
		return '(no answer)';
	const text = (id: unknown) => choices?.find((c) => c.id === id)?.text ?? String(id);
	if (kind === 'multiple' && Array.isArray(response)) return response.map(text).join(' + ');
	if (kind === 'single' || kind === 'true_false') return text(response);
	return String(response);
}

/**
 * Per question of every version of the check: times drawn in graded attempts, share answered
 * correctly and the most common wrong answer. Most missed first.
 */
export async function itemStatistics(checkId: number): Promise<ItemStat[]> {
	const rows = await db
		.select({
			questionId: attemptItems.questionId,
			response: attemptItems.response,
			correct: attemptItems.correct,
			kind: checkQuestions.kind,
			prompt: checkQuestions.prompt,
			position: checkQuestions.position,
			choices: checkQuestions.choices,
			version: checkVersions.version
		})
		.from(attemptItems)
		.innerJoin(checkAttempts, eq(checkAttempts.id, attemptItems.attemptId))
		.innerJoin(checkQuestions, eq(checkQuestions.id, attemptItems.questionId))
		.innerJoin(checkVersions, eq(checkVersions.id, checkQuestions.checkVersionId))
		.where(and(eq(checkVersions.checkId, checkId), ne(checkAttempts.state, 'open')));
	const byQuestion = new Map<number, { stat: ItemStat; wrong: Map<string, number> }>();
	for (const r of rows) {
		let entry = byQuestion.get(r.questionId);
		if (!entry) {
			entry = {
				stat: {
					questionId: r.questionId,
					version: r.version,
					position: r.position,
					kind: r.kind,
					prompt: r.prompt,
					drawn: 0,
					correct: 0,
					pctCorrect: 0,
					mostCommonWrong: null,
					mostCommonWrongCount: 0
				},
				wrong: new Map()
			};
			byQuestion.set(r.questionId, entry);
		}
		entry.stat.drawn++;
		if (r.correct) entry.stat.correct++;
		else {
			const said = describeResponse(r.kind, r.choices ?? null, r.response);
			entry.wrong.set(said, (entry.wrong.get(said) ?? 0) + 1);
		}
	}
	const stats = [...byQuestion.values()].map(({ stat, wrong }) => {
		const top = [...wrong.entries()].sort((a, b) => b[1] - a[1] || a[0].localeCompare(b[0]))[0];
		return {
			...stat,
			pctCorrect: Math.round((stat.correct / stat.drawn) * 1000) / 10,
			mostCommonWrong: top?.[0] ?? null,
			mostCommonWrongCount: top?.[1] ?? 0
		};
	});
	return stats.sort(
		(a, b) =>
			a.pctCorrect - b.pctCorrect ||
			b.drawn - a.drawn ||
			a.version - b.version ||
			a.position - b.position
	);
}
