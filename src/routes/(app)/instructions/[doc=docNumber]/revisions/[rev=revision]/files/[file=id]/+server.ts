import { error } from '@sveltejs/kit';
import { requireApiRole } from '$lib/server/auth/guards';
import { pageRefusal, resolveRevisionForViewer } from '$lib/server/instructions';
import { getObjectStream } from '$lib/server/storage';
import type { RequestHandler } from './$types';

/** Streams a revision file from S3 to people allowed to read that revision, with safe headers. */
export const GET: RequestHandler = async (event) => {
	const user = requireApiRole(event);
	const { revision } = await resolveRevisionForViewer(
		user,
		event.params.doc,
		event.params.rev
	).catch(pageRefusal);
	const file = revision.files.find((f) => f.id === Number(event.params.file));
	if (!file) error(404, { message: 'Not found' });
	const body = await getObjectStream(file.storageKey);
	if (!body) error(404, { message: 'Not found' });
	const disposition = file.kind === 'image' ? 'inline' : 'attachment';
	const ascii = file.originalName.replace(/[^\x20-\x7e]/g, '_').replace(/["\\]/g, '_');
	return new Response(body, {
		headers: {
			'Content-Type': file.contentType,
			'Content-Length': String(file.sizeBytes),
			'Content-Disposition': `${disposition}; filename="${ascii}"; filename*=UTF-8''${encodeURIComponent(file.originalName)}`,
			'X-Content-Type-Options': 'nosniff',
			'Content-Security-Policy': "sandbox; default-src 'none'",
			'Cross-Origin-Resource-Policy': 'same-origin'
		}
	});
};
