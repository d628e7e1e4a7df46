import { error } from '@sveltejs/kit';
import { requireUser } from '$lib/server/auth/guards';
import { pageRefusal } from '$lib/server/errors';
import { getSignoffPhoto } from '$lib/server/training/signoffs';
import { getObjectStream } from '$lib/server/storage';
import type { RequestHandler } from './$types';

/** A step's photo, for those who may see the sign-off; served so it cannot run anything. */
export const GET: RequestHandler = async (event) => {
	const user = requireUser(event);
	const photo = await getSignoffPhoto(
		user,
		Number(event.params.id),
		Number(event.params.item)
	).catch(pageRefusal);
	const body = await getObjectStream(photo.key);
	if (!body) error(404, { message: 'No photo for this step.' });
	return new Response(body, {
		headers: {
			'Content-Type': photo.type,
			'Content-Disposition': 'inline',
			'X-Content-Type-Options': 'nosniff',
			'Content-Security-Policy': "sandbox; default-src 'none'",
			'Cross-Origin-Resource-Policy': 'same-origin',
			'Cache-Control': 'private, no-store'
		}
	});
};
