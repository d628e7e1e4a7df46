import { json } from '@sveltejs/kit';
import { requireApiRole } from '$lib/server/auth/guards';
import { apiRefusal, renderRevision, resolveRevisionForViewer } from '$lib/server/instructions';
import type { RequestHandler } from './$types';

/** One revision; 404 for anyone outside the archive roles unless it is the one in force. */
export const GET: RequestHandler = async (event) => {
	const user = requireApiRole(event);
	try {
		const { instruction, revision, status } = await resolveRevisionForViewer(
			user,
			event.params.doc,
			event.params.rev
		);
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
			status,
			effectiveFrom: revision.effectiveFrom,
			version: revision.version,
			html: r.html
		});
	} catch (err) {
		return apiRefusal(err);
	}
};
