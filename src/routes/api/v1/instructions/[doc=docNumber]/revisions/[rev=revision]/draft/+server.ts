import { json } from '@sveltejs/kit';
import { actorFrom } from '$lib/server/audit';
import { requireApiRole } from '$lib/server/auth/guards';
import {
	AUTHOR_ROLES,
	apiRefusal,
	resolveRevisionForViewer,
	saveDraft
} from '$lib/server/instructions';
import { DRAFT_BODY_MAX_BYTES, draftSaveSchema } from '$lib/schemas/instructions';
import { bodyRefusal, fieldErrors, readJson } from '$lib/server/api';
import type { RequestHandler } from './$types';

/** Autosave: `{ source, version }` → `{ version }`, or 409 with the text saved in between. */
export const POST: RequestHandler = async (event) => {
	const user = requireApiRole(event, ...AUTHOR_ROLES);
	const body = await readJson(event.request, { maxBytes: DRAFT_BODY_MAX_BYTES });
	if (!body.ok) return bodyRefusal(body);
	const parsed = draftSaveSchema.safeParse(body.value);
	if (!parsed.success)
		return json(
			{ error: 'Send { source, version } as JSON.', fields: fieldErrors(parsed.error) },
			{ status: 400 }
		);
	try {
		const { revision } = await resolveRevisionForViewer(user, event.params.doc, event.params.rev);
		const saved = await saveDraft({ ...actorFrom(event), id: user.id }, revision.id, parsed.data);
		return json({ version: saved.version, contentHash: saved.contentHash });
	} catch (err) {
		return apiRefusal(err);
	}
};
