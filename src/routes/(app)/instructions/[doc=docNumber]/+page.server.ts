import { Refusal } from '$lib/server/errors';
import { fail, redirect } from '@sveltejs/kit';
import { actorFrom } from '$lib/server/audit';
import { requireRole, requireUser } from '$lib/server/auth/guards';
import {
	APPROVER_ROLES,
	AUTHOR_ROLES,
	canApprove,
	canAuthor,
	canSeeArchive,
	createNextRevision,
	findInstruction,
	listRevisions,
	pageRefusal,
	renderRevision,
	resolveEffectiveForViewer,
	verifyRevisionSignatures,
	withdrawInstruction
} from '$lib/server/instructions';
import { withdrawSchema } from '$lib/schemas/instructions';
import { localDate } from '$lib/time';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const user = requireUser(event);
	const now = new Date();
	const { instruction, revision } = await resolveEffectiveForViewer(
		user,
		event.params.doc,
		now
	).catch(pageRefusal);
	const archive = canSeeArchive(user.roles);
	return {
		instruction: {
			docNumber: instruction.docNumber,
			title: instruction.title,
			processName: instruction.processName,
			stations: instruction.stations,
			withdrawn: !!instruction.withdrawnAt
		},
		revision: revision && {
			letter: revision.letter,
			effectiveFrom: revision.effectiveFrom!,
			approvedByName: revision.approvedByName,
			html: (
				await renderRevision(
					instruction.docNumber,
					revision.letter,
					revision.source,
					revision.files
				)
			).html,
			attachments: revision.files
				.filter((f) => f.kind === 'attachment')
				.map((f) => ({ id: f.id, name: f.originalName, sizeBytes: f.sizeBytes }))
		},
		signatures: revision ? await verifyRevisionSignatures(revision.id) : [],
		revisions: archive
			? (await listRevisions(instruction.id, now)).map((r) => ({
					letter: r.letter,
					status: r.status,
					effectiveFrom: r.effectiveFrom,
					authorName: r.authorName
				}))
			: null,
		canAuthor: canAuthor(user.roles),
		canWithdraw: canApprove(user.roles) && !instruction.withdrawnAt,
		printedOn: localDate(now, user.timeZone)
	};
};

export const actions: Actions = {
	newRevision: async (event) => {
		const user = requireRole(event, ...AUTHOR_ROLES);
		const instruction = await findInstruction(event.params.doc);
		if (!instruction) return fail(404, { message: 'No such instruction' });
		try {
			const r = await createNextRevision({ ...actorFrom(event), id: user.id }, instruction.id);
			redirect(303, `/instructions/${instruction.docNumber}/revisions/${r.letter}/edit`);
		} catch (err) {
			if (err instanceof Refusal) return fail(err.status, { message: err.message });
			throw err;
		}
	},
	withdraw: async (event) => {
		const user = requireRole(event, ...APPROVER_ROLES);
		const instruction = await findInstruction(event.params.doc);
		if (!instruction) return fail(404, { message: 'No such instruction' });
		const parsed = withdrawSchema.safeParse(Object.fromEntries(await event.request.formData()));
		if (!parsed.success) return fail(400, { withdrawError: parsed.error.issues[0].message });
		try {
			await withdrawInstruction(
				{ ...actorFrom(event), id: user.id },
				instruction.id,
				parsed.data.reason
			);
		} catch (err) {
			if (err instanceof Refusal) return fail(err.status, { withdrawError: err.message });
			throw err;
		}
		redirect(303, `/instructions/${instruction.docNumber}`);
	}
};
