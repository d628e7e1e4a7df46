import { json } from '@sveltejs/kit';
import { requireApiRole } from '$lib/server/auth/guards';
import {
	AUTHOR_ROLES,
	findInstruction,
	getRevision,
	renderRevision
} from '$lib/server/instructions';
import { renderInstruction } from '$lib/markdown/render';
import { DRAFT_BODY_MAX_BYTES, previewSchema } from '$lib/schemas/instructions';
import { bodyRefusal, fieldErrors, readJson } from '$lib/server/api';
import type { RequestHandler } from './$types';

/** Renders draft Markdown with the same server renderer the point of use uses. */
export const POST: RequestHandler = async (event) => {
	requireApiRole(event, ...AUTHOR_ROLES);
	const body = await readJson(event.request, { maxBytes: DRAFT_BODY_MAX_BYTES });
	if (!body.ok) return bodyRefusal(body);
	const parsed = previewSchema.safeParse(body.value);
	if (!parsed.success)
		return json(
			{ error: 'Send { source } as JSON.', fields: fieldErrors(parsed.error) },
			{ status: 400 }
		);
	const { source, docNumber, letter } = parsed.data;
	if (docNumber && letter) {
		const instruction = await findInstruction(docNumber);
		const revision = instruction && (await getRevision(instruction.id, letter));
		if (revision) {
			const r = await renderRevision(docNumber, letter, source, revision.files);
			return json({ html: r.html, warnings: r.warnings });
		}
	}
	const r = await renderInstruction(source);
	return json({ html: r.html, warnings: r.warnings });
};
