import { error } from '@sveltejs/kit';
import { pageRefusal } from '$lib/server/errors';
import { verifyCertificateToken } from '$lib/server/certificates/verify';
import type { PageServerLoad } from './$types';

/** No sign-in: whoever holds the QR code's token sees status, process and expiry, nothing more. */
export const load: PageServerLoad = async (event) => {
	const view = await verifyCertificateToken(event.params.token, event.getClientAddress()).catch(
		pageRefusal
	);
	if (!view) error(404, { message: 'No certificate matches this code.' });
	return { view };
};
