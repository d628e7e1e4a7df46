import { json } from '@sveltejs/kit';
import { actorFrom } from '$lib/server/audit';
import { requireApiRole } from '$lib/server/auth/guards';
import { postedFormData } from '$lib/server/forms';
import {
	AUTHOR_ROLES,
	addRevisionFile,
	apiRefusal,
	resolveRevisionForViewer
} from '$lib/server/instructions';
import type { RequestHandler } from './$types';

/** Upload one file (multipart field `file`) into a draft revision. */
export const POST: RequestHandler = async (event) => {
	const user = requireApiRole(event, ...AUTHOR_ROLES);
	// undefined: not a form body at all (answered below with the field to send).
	const form = await postedFormData(event.request).catch(() => undefined);
	if (form === null)
		return json(
			{
				error:
					'The upload is larger than the server accepts: images may be at most 10 MB, PDFs 20 MB.',
				fields: { file: 'Too large.' }
			},
			{ status: 413 }
		);
	const file = form?.get('file');
	if (!(file instanceof File))
		return json(
			{
				error: 'Send the file as multipart form data in the field "file".',
				fields: { file: 'Missing.' }
			},
			{ status: 400 }
		);
	try {
		const { revision } = await resolveRevisionForViewer(user, event.params.doc, event.params.rev);
		const added = await addRevisionFile({ ...actorFrom(event), id: user.id }, revision.id, {
			name: file.name,
			bytes: new Uint8Array(await file.arrayBuffer())
		});
		return json(added, { status: 201 });
	} catch (err) {
		return apiRefusal(err);
	}
};
