import { Refusal } from '$lib/server/errors';
import { fail, redirect } from '@sveltejs/kit';
import { message, setError, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { actorFrom } from '$lib/server/audit';
import { requireRole } from '$lib/server/auth/guards';
import {
	APPROVER_ROLES,
	diffRenderedBlocks,
	diffSourceLines,
	getRevision,
	listReviewComments,
	loadEffectiveRevisions,
	pageRefusal,
	rejectRevision,
	renderRevision,
	resolveRevisionForViewer,
	signRevision,
	verifyRevisionSignatures
} from '$lib/server/instructions';
import { rejectSchema, signSchema } from '$lib/schemas/instructions';
import { localDate } from '$lib/time';
import type { Actions, PageServerLoad, RequestEvent } from './$types';
import { superValidatePosted } from '$lib/server/forms';

async function reviewOf(event: RequestEvent) {
	const user = requireRole(event, ...APPROVER_ROLES);
	const found = await resolveRevisionForViewer(user, event.params.doc, event.params.rev).catch(
		pageRefusal
	);
	return { user, ...found };
}

export const load: PageServerLoad = async (event) => {
	const { user, instruction, revision, status } = await reviewOf(event);
	if (status !== 'in_review')
		redirect(303, `/instructions/${instruction.docNumber}/revisions/${revision.letter}`);
	const effMeta = (await loadEffectiveRevisions(new Date(), [instruction.id])).get(instruction.id);
	const base = effMeta ? await getRevision(instruction.id, effMeta.letter) : null;
	const render = (r: NonNullable<typeof base>) =>
		renderRevision(instruction.docNumber, r.letter, r.source, r.files);
	const diff = diffSourceLines(base?.source ?? '', revision.source);
	const html = (await render(revision)).html;
	const baseHtml = base ? (await render(base)).html : '';
	return {
		instruction: { docNumber: instruction.docNumber, title: instruction.title },
		revision: {
			letter: revision.letter,
			authorName: revision.authorName,
			isMine: revision.authorId === user.id,
			changeSummary: revision.changeSummary,
			reason: revision.reason,
			classification: revision.classification,
			submittedAt: revision.submittedAt
		},
		base: base ? { letter: base.letter } : null,
		diff,
		rendered: diffRenderedBlocks(baseHtml, html),
		signatures: await verifyRevisionSignatures(revision.id),
		comments: await listReviewComments(revision.id),
		signForm: await superValidate(
			{
				meaning: 'approved' as const,
				effectiveDate: localDate(new Date(Date.now() + 86_400_000), user.timeZone),
				effectiveTime: '06:00'
			},
			zod4(signSchema),
			{ errors: false, id: 'sign' }
		),
		rejectForm: await superValidate(zod4(rejectSchema), { id: 'reject' })
	};
};

export const actions: Actions = {
	sign: async (event) => {
		const { user, instruction, revision } = await reviewOf(event);
		const form = await superValidatePosted(event.request, zod4(signSchema), { id: 'sign' });
		if (!form.valid) return fail(400, { signForm: form });
		const { password, ...rest } = form.data;
		form.data.password = '';
		try {
			await signRevision({ ...actorFrom(event), id: user.id }, revision.id, {
				...rest,
				password,
				timeZone: user.timeZone
			});
		} catch (err) {
			if (err instanceof Refusal) {
				if (err.fields?.password)
					return setError(form, 'password', err.fields.password, { status: err.status });
				if (err.fields?.effectiveDate)
					return setError(form, 'effectiveDate', err.fields.effectiveDate, { status: err.status });
				return message(form, err.message, { status: err.status });
			}
			throw err;
		}
		redirect(303, `/instructions/${instruction.docNumber}/revisions/${revision.letter}`);
	},
	reject: async (event) => {
		const { user, instruction, revision } = await reviewOf(event);
		const form = await superValidatePosted(event.request, zod4(rejectSchema), { id: 'reject' });
		if (!form.valid) return fail(400, { rejectForm: form });
		try {
			await rejectRevision({ ...actorFrom(event), id: user.id }, revision.id, form.data.comment);
		} catch (err) {
			if (err instanceof Refusal) return message(form, err.message, { status: err.status });
			throw err;
		}
		redirect(303, `/instructions/${instruction.docNumber}/revisions/${revision.letter}`);
	}
};
