import { fail, redirect } from '@sveltejs/kit';
import { message, setError, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { signInWithCredentials } from '$lib/server/auth/authjs';
import { badgeSignInSchema, passwordSignInSchema } from '$lib/schemas/people';
import type { Actions, PageServerLoad } from './$types';
import { superValidatePosted } from '$lib/server/forms';

/** Only same-site paths; anything else goes home. */
function safeRedirect(to: string | null | undefined): string {
	return to && to.startsWith('/') && !to.startsWith('//') && !to.startsWith('/\\') ? to : '/';
}

export const load: PageServerLoad = async ({ locals, url }) => {
	if (locals.user) redirect(303, safeRedirect(url.searchParams.get('redirectTo')));
	const redirectTo = safeRedirect(url.searchParams.get('redirectTo'));
	return {
		badgeForm: await superValidate({ redirectTo }, zod4(badgeSignInSchema), {
			errors: false,
			id: 'badge'
		}),
		passwordForm: await superValidate({ redirectTo }, zod4(passwordSignInSchema), {
			errors: false,
			id: 'password'
		}),
		signedOut: url.searchParams.has('signedOut')
	};
};

const FAILED = 'That did not match. Check and try again.';
const THROTTLED = 'Too many failed tries. Wait 15 minutes, or ask your line lead or an admin.';

export const actions: Actions = {
	password: async (event) => {
		const form = await superValidatePosted(event.request, zod4(passwordSignInSchema), {
			id: 'password'
		});
		if (!form.valid) return fail(400, { passwordForm: form });
		const outcome = await signInWithCredentials(event, {
			providerId: 'password',
			email: form.data.email,
			password: form.data.password
		});
		if (outcome === 'signed-in') redirect(303, safeRedirect(form.data.redirectTo));
		form.data.password = '';
		if (outcome === 'throttled') return message(form, THROTTLED, { status: 429 });
		setError(form, 'password', FAILED);
		return message(form, FAILED, { status: 400 });
	},
	badge: async (event) => {
		const form = await superValidatePosted(event.request, zod4(badgeSignInSchema), { id: 'badge' });
		if (!form.valid) return fail(400, { badgeForm: form });
		const outcome = await signInWithCredentials(event, {
			providerId: 'badge',
			badge: form.data.badge,
			pin: form.data.pin
		});
		if (outcome === 'signed-in') redirect(303, safeRedirect(form.data.redirectTo));
		form.data.pin = '';
		if (outcome === 'throttled') return message(form, THROTTLED, { status: 429 });
		setError(form, 'pin', FAILED);
		return message(form, FAILED, { status: 400 });
	}
};
