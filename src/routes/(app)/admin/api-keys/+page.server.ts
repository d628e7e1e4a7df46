import { fail, redirect } from '@sveltejs/kit';
import { message, setError, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { actorFrom } from '$lib/server/audit';
import { requireRole } from '$lib/server/auth/guards';
import {
	ApiKeyError,
	createApiKey,
	listApiKeys,
	listKeyStations,
	revokeApiKey,
	rotateApiKey
} from '$lib/server/apikeys';
import { createApiKeySchema, revokeApiKeySchema, rotateApiKeySchema } from '$lib/schemas/api-keys';
import type { Actions, PageServerLoad } from './$types';
import { superValidatePosted } from '$lib/server/forms';

export const load: PageServerLoad = async (event) => {
	requireRole(event, 'admin');
	const revoked = event.url.searchParams.get('revoked');
	return {
		keys: await listApiKeys(),
		stations: await listKeyStations(),
		form: await superValidate(zod4(createApiKeySchema), { id: 'create' }),
		revoked: revoked && /^[A-Za-z0-9_-]{1,16}$/.test(revoked) ? revoked : null
	};
};

// Create and rotate answer with the page instead of a redirect: the new key is shown in that one
// response and never again, so it must not travel in a URL or a cookie.
export const actions: Actions = {
	create: async (event) => {
		requireRole(event, 'admin');
		const form = await superValidatePosted(event.request, zod4(createApiKeySchema), {
			id: 'create'
		});
		if (!form.valid) return fail(400, { form });
		try {
			const issued = await createApiKey(actorFrom(event), form.data);
			return message(form, { key: issued.key, prefix: issued.prefix, name: issued.name });
		} catch (err) {
			if (err instanceof ApiKeyError) return setError(form, 'stationId', err.message);
			throw err;
		}
	},
	rotate: async (event) => {
		requireRole(event, 'admin');
		const form = await superValidatePosted(event.request, zod4(rotateApiKeySchema));
		if (!form.valid)
			return fail(400, { rotateError: { id: form.data.id, message: 'Invalid request' } });
		try {
			const issued = await rotateApiKey(actorFrom(event), form.data.id, form.data.reason);
			return { rotated: { key: issued.key, prefix: issued.prefix, name: issued.name } };
		} catch (err) {
			if (err instanceof ApiKeyError) {
				return fail(409, { rotateError: { id: form.data.id, message: err.message } });
			}
			throw err;
		}
	},
	revoke: async (event) => {
		requireRole(event, 'admin');
		const form = await superValidatePosted(event.request, zod4(revokeApiKeySchema));
		if (!form.valid) {
			const message = form.errors.reason?.[0] ?? 'Invalid request';
			return fail(400, { revokeError: { id: form.data.id, message, reason: form.data.reason } });
		}
		let prefix: string;
		try {
			prefix = await revokeApiKey(actorFrom(event), form.data.id, form.data.reason);
		} catch (err) {
			if (err instanceof ApiKeyError) {
				return fail(409, { revokeError: { id: form.data.id, message: err.message, reason: '' } });
			}
			throw err;
		}
		redirect(303, `/admin/api-keys?revoked=${encodeURIComponent(prefix)}`);
	}
};
