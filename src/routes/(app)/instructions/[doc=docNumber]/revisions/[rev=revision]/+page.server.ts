import { redirect } from '@sveltejs/kit';
import { requireUser } from '$lib/server/auth/guards';
import {
	canApprove,
	canAuthor,
	canSeeArchive,
	listReviewComments,
	pageRefusal,
	renderRevision,
	resolveRevisionForViewer,
	verifyRevisionSignatures
} from '$lib/server/instructions';
import { localDate } from '$lib/time';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const user = requireUser(event);
	const now = new Date();
	const { instruction, revision, status, effectiveLetter } = await resolveRevisionForViewer(
		user,
		event.params.doc,
		event.params.rev,
		now
	).catch(pageRefusal);
	// People outside the archive roles read the revision in force at its point of use only.
	if (!canSeeArchive(user.roles)) redirect(303, `/instructions/${instruction.docNumber}`);
	const rendered = await renderRevision(
		instruction.docNumber,
		revision.letter,
		revision.source,
		revision.files
	);
	return {
		instruction: { docNumber: instruction.docNumber, title: instruction.title },
		revision: {
			letter: revision.letter,
			status,
			effectiveFrom: revision.effectiveFrom,
			authorName: revision.authorName,
			approvedByName: revision.approvedByName,
			changeSummary: revision.changeSummary,
			reason: revision.reason,
			classification: revision.classification,
			submittedAt: revision.submittedAt,
			html: rendered.html,
			warnings: rendered.warnings,
			files: revision.files.map((f) => ({
				id: f.id,
				name: f.originalName,
				kind: f.kind,
				sizeBytes: f.sizeBytes
			}))
		},
		effectiveLetter,
		signatures: await verifyRevisionSignatures(revision.id),
		comments: await listReviewComments(revision.id),
		canEdit: canAuthor(user.roles) && status === 'draft',
		canReview: canApprove(user.roles) && status === 'in_review',
		printedOn: localDate(now, user.timeZone)
	};
};
