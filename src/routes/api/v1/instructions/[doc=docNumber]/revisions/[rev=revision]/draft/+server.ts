import { json } from '@sveltejs/kit';
import { actorFrom } from '$lib/server/audit';
import { requireApiRole } from '$lib/server/auth/guards';
import {
	AUTHOR_ROLES,
	apiRefusal,
	resolveRevisionForViewer,
	saveDraft
} from '$lib/server/instructions';
import { draftSaveSchema } from '$lib/schemas/instructions';
import type { RequestHandler } from './$types';

/** Autosave: `{ source, version }` → `{ version }`, or 409 with the text saved in between. */
export const POST: RequestHandler = async (event) => {
	const user = requireApiRole(event, ...AUTHOR_ROLES);
	const parsed = draftSaveSchema.safeParse(await event.request.json().catch(() => null));
	if (!parsed.success)
		return json(
			{
				error: 'Send { source, version } as JSON.',
				fields: Object.fromEntries(parsed.error.issues.map((i) => [i.path.join('.'), i.message]))
			},
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
