// "I have read and understood revision C": the person's own PIN or password again, bound to the
// revision's content hash, with what changed since the revision they last acknowledged shown first.
import { and, asc, desc, eq } from 'drizzle-orm';
import { db } from '../db';
import { acknowledgements, revisions } from '../db/schema';
import { recordAudit, type Actor } from '../audit';
import { reauthenticate } from '../auth/reauth';
import { Refusal, isDuplicateKey } from '../errors';
import { letterToNumber } from '../../instructions/vocabulary';
import {
	diffRenderedBlocks,
	getRevision,
	renderRevision,
	resolveEffectiveForViewer,
	type Viewer
} from '../instructions';
import { rulesInForce } from '../certificates/evaluate';
import { evaluateAndIssue, type IssueResult } from '../certificates/issue';

/** Everything the acknowledgement page shows for the effective revision of `docNumber`. */
export async function acknowledgementView(viewer: Viewer, docNumber: string, now = new Date()) {
	const { instruction, revision } = await resolveEffectiveForViewer(viewer, docNumber, now);
	if (!revision) throw new Refusal(404, 'No revision of this instruction is in force');
	const mine = await db
		.select({
			revisionId: acknowledgements.revisionId,
			at: acknowledgements.acknowledgedAt,
			letter: revisions.letter
		})
		.from(acknowledgements)
		.innerJoin(revisions, eq(revisions.id, acknowledgements.revisionId))
		.where(
			and(eq(acknowledgements.personId, viewer.id), eq(revisions.instructionId, instruction.id))
		)
		.orderBy(desc(acknowledgements.acknowledgedAt));
	const current = mine.find((a) => a.revisionId === revision.id) ?? null;
	const previous =
		mine
			.filter((a) => a.revisionId !== revision.id)
			.sort((a, b) => letterToNumber(b.letter) - letterToNumber(a.letter))[0] ?? null;

	// Change notes of every revision after the one last acknowledged, up to the current one.
	const history = await db
		.select({
			letter: revisions.letter,
			changeSummary: revisions.changeSummary,
			reason: revisions.reason,
			classification: revisions.classification,
			effectiveFrom: revisions.effectiveFrom
		})
		.from(revisions)
		.where(eq(revisions.instructionId, instruction.id))
		.orderBy(asc(revisions.id));
	const from = previous ? letterToNumber(previous.letter) : 0;
	const upTo = letterToNumber(revision.letter);
	const changes = history.filter((h) => {
		const n = letterToNumber(h.letter);
		return n > from && n <= upTo && h.effectiveFrom;
	});

	const render = (r: NonNullable<Awaited<ReturnType<typeof getRevision>>>) =>
		renderRevision(instruction.docNumber, r.letter, r.source, r.files);
	const html = (await render(revision)).html;
	// First reading: nothing is marked; after an earlier acknowledgement, what changed since it is.
	let blocks = diffRenderedBlocks(html, html).right;
	if (previous) {
		const old = await getRevision(instruction.id, previous.letter);
		if (old) blocks = diffRenderedBlocks((await render(old)).html, html).right;
	}
	return { instruction, revision, html, blocks, current, previous, changes };
}

/**
 * Records the acknowledgement after re-authentication (password, or PIN for badge users), audits
 * it, and then checks whether it completes a certification rule.
 */
export async function acknowledgeRevision(
	actor: Actor & { id: number },
	viewer: Viewer,
	docNumber: string,
	secret: string,
	now = new Date()
): Promise<{ acknowledgementId: number; issued: IssueResult[] }> {
	const { instruction, revision } = await resolveEffectiveForViewer(viewer, docNumber, now);
	if (!revision) throw new Refusal(404, 'No revision of this instruction is in force');
	const label = `${instruction.docNumber} rev ${revision.letter}`;
	const { method } = await reauthenticate(
		actor,
		secret,
		{ type: 'revision', id: revision.id, label },
		['password', 'pin']
	);
	let acknowledgementId: number;
	try {
		acknowledgementId = await db.transaction(async (tx) => {
			const [{ id }] = await tx
				.insert(acknowledgements)
				.values({
					personId: actor.id,
					revisionId: revision.id,
					method,
					contentHash: revision.contentHash,
					acknowledgedAt: now
				})
				.$returningId();
			await recordAudit(tx, actor, {
				action: 'revision.acknowledged',
				entityType: 'revision',
				entityId: revision.id,
				newValues: { revision: label, method, contentHash: revision.contentHash },
				reason: 'read and understood'
			});
			return id;
		});
	} catch (err) {
		if (isDuplicateKey(err)) throw new Refusal(409, `You have already acknowledged ${label}.`);
		throw err;
	}
	const rules = await rulesInForce(null, now);
	const issued: IssueResult[] = [];
	for (const rule of rules.values()) {
		if (rule.instructionIds.includes(instruction.id)) {
			issued.push(await evaluateAndIssue(actor.id, rule.processId, { actor, now }));
		}
	}
	return { acknowledgementId, issued };
}
