import { error } from '@sveltejs/kit';
import { requireUser } from '$lib/server/auth/guards';
import { pageRefusal } from '$lib/server/errors';
import { certificatePdfFor } from '$lib/server/certificates/register';
import { ensureCertificatePdf } from '$lib/server/certificates/issue';
import { getObjectStream } from '$lib/server/storage';
import type { RequestHandler } from './$types';

/** The certificate's PDF for its holder (and quality, admin); everyone else gets a plain 404. */
export const GET: RequestHandler = async (event) => {
	const user = requireUser(event);
	const c = await certificatePdfFor(user, Number(event.params.id)).catch(pageRefusal);
	const key = c.pdfKey ?? (await ensureCertificatePdf(c.id));
	const body = key ? await getObjectStream(key) : null;
	if (!body) error(404, { message: 'The PDF of this certificate is not available yet.' });
	return new Response(body, {
		headers: {
			'Content-Type': 'application/pdf',
			'Content-Disposition': `attachment; filename="${c.number}.pdf"`,
			'X-Content-Type-Options': 'nosniff',
			'Cache-Control': 'private, no-store'
		}
	});
};
