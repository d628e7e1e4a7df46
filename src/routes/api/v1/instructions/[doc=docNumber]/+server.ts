import { json } from '@sveltejs/kit';
import { requireApiRole } from '$lib/server/auth/guards';
import { apiRefusal, renderRevision, resolveEffectiveForViewer } from '$lib/server/instructions';
import type { RequestHandler } from './$types';

/** The revision in force now, rendered. */
export const GET: RequestHandler = async (event) => {
	const user = requireApiRole(event);
	try {
		const { instruction, revision } = await resolveEffectiveForViewer(user, event.params.doc);
		if (!revision) return json({ error: 'No revision is in force.' }, { status: 404 });
		const r = await renderRevision(
			instruction.docNumber,
			revision.letter,
			revision.source,
			revision.files
		);
		return json({
			docNumber: instruction.docNumber,
			title: instruction.title,
			revision: revision.letter,
			status: 'effective',
			effectiveFrom: revision.effectiveFrom,
			html: r.html
		});
	} catch (err) {
		return apiRefusal(err);
	}
};
