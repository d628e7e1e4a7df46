import { Refusal } from '$lib/server/errors';
import { fail, redirect } from '@sveltejs/kit';
import { superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { z } from 'zod';
import { actorFrom } from '$lib/server/audit';
import { requireRole } from '$lib/server/auth/guards';
import {
	AUTHOR_ROLES,
	addRevisionFile,
	listReviewComments,
	pageRefusal,
	removeRevisionFile,
	renderRevision,
	resolveRevisionForViewer,
	saveDraft,
	submitRevision
} from '$lib/server/instructions';
import { draftSaveSchema, submitSchema } from '$lib/schemas/instructions';
import type { Actions, PageServerLoad, RequestEvent } from './$types';
import { postedFormData, superValidatePosted } from '$lib/server/forms';

async function draftOf(event: RequestEvent) {
	const user = requireRole(event, ...AUTHOR_ROLES);
	const found = await resolveRevisionForViewer(user, event.params.doc, event.params.rev).catch(
		pageRefusal
	);
	return { user, ...found };
}

export const load: PageServerLoad = async (event) => {
	const { instruction, revision, status } = await draftOf(event);
	if (status !== 'draft')
		redirect(303, `/instructions/${instruction.docNumber}/revisions/${revision.letter}`);
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
			source: revision.source,
			version: revision.version,
			lastEditedByName: revision.lastEditedByName,
			updatedAt: revision.updatedAt,
			html: rendered.html,
			files: revision.files.map((f) => ({
				id: f.id,
				name: f.originalName,
				kind: f.kind,
				sizeBytes: f.sizeBytes
			}))
		},
		comments: (await listReviewComments(revision.id)).filter((c) => c.kind === 'rejection'),
		submitForm: await superValidate({ version: revision.version }, zod4(submitSchema), {
			errors: false
		})
	};
};

const saveForm = z.object({
	source: draftSaveSchema.shape.source,
	version: z.coerce.number().int().positive()
});
const fileForm = z.object({ file: z.instanceof(File, { message: 'Choose a file to upload.' }) });
const removeForm = z.object({ fileId: z.coerce.number().int().positive() });

export const actions: Actions = {
	save: async (event) => {
		const { user, revision } = await draftOf(event);
		const parsed = saveForm.safeParse(Object.fromEntries(await event.request.formData()));
		if (!parsed.success) return fail(400, { saveError: parsed.error.issues[0].message });
		try {
			await saveDraft({ ...actorFrom(event), id: user.id }, revision.id, parsed.data);
		} catch (err) {
			if (err instanceof Refusal)
				return fail(err.status, {
					saveError: err.message,
					mine: parsed.data.source,
					conflict: err.detail?.conflict
				});
			throw err;
		}
		return { saved: true };
	},
	submit: async (event) => {
		const { user, instruction, revision } = await draftOf(event);
		const form = await superValidatePosted(event.request, zod4(submitSchema));
		if (!form.valid) return fail(400, { submitForm: form });
		try {
			await submitRevision({ ...actorFrom(event), id: user.id }, revision.id, form.data);
		} catch (err) {
			if (err instanceof Refusal)
				return fail(err.status, { submitForm: form, submitError: err.message });
			throw err;
		}
		redirect(303, `/instructions/${instruction.docNumber}/revisions/${revision.letter}`);
	},
	upload: async (event) => {
		const { user, revision } = await draftOf(event);
		const body = await postedFormData(event.request);
		if (!body)
			return fail(413, {
				uploadError:
					'The file is larger than the server accepts. Images may be at most 10 MB, PDF files 20 MB.'
			});
		const parsed = fileForm.safeParse(Object.fromEntries(body));
		if (!parsed.success) return fail(400, { uploadError: parsed.error.issues[0].message });
		const file = parsed.data.file;
		try {
			const added = await addRevisionFile({ ...actorFrom(event), id: user.id }, revision.id, {
				name: file.name,
				bytes: new Uint8Array(await file.arrayBuffer())
			});
			return { uploaded: added.originalName, uploadedKind: added.kind };
		} catch (err) {
			if (err instanceof Refusal) return fail(err.status, { uploadError: err.message });
			throw err;
		}
	},
	removeFile: async (event) => {
		const { user, revision } = await draftOf(event);
		const parsed = removeForm.safeParse(Object.fromEntries(await event.request.formData()));
		if (!parsed.success) return fail(400, { uploadError: 'No file chosen.' });
		try {
			await removeRevisionFile(
				{ ...actorFrom(event), id: user.id },
				revision.id,
				parsed.data.fileId
			);
		} catch (err) {
			if (err instanceof Refusal) return fail(err.status, { uploadError: err.message });
			throw err;
		}
		return { removed: true };
	}
};
