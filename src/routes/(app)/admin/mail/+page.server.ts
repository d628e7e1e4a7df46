import { fail, redirect } from '@sveltejs/kit';
import { zod4 } from 'sveltekit-superforms/adapters';
import { actorFrom } from '$lib/server/audit';
import { requireRole } from '$lib/server/auth/guards';
import {
	OutboxError,
	outboxCounts,
	outboxProblems,
	resendMail
} from '$lib/server/mail/outbox-admin';
import { resendMailSchema } from '$lib/schemas/mail';
import type { Actions, PageServerLoad } from './$types';
import { superValidatePosted } from '$lib/server/forms';

export const load: PageServerLoad = async (event) => {
	requireRole(event, 'admin');
	const resent = Number(event.url.searchParams.get('resent'));
	return {
		counts: await outboxCounts(),
		problems: await outboxProblems(),
		resent: Number.isSafeInteger(resent) && resent > 0 ? resent : null
	};
};

export const actions: Actions = {
	resend: async (event) => {
		requireRole(event, 'admin');
		const form = await superValidatePosted(event.request, zod4(resendMailSchema));
		const id = Number.isSafeInteger(form.data.id) ? form.data.id : 0;
		if (!form.valid) {
			const message = form.errors.reason?.[0] ?? form.errors.id?.[0] ?? 'Invalid request';
			return fail(400, { resendError: { id, message, reason: form.data.reason ?? '' } });
		}
		try {
			await resendMail(actorFrom(event), form.data.id, form.data.reason);
		} catch (err) {
			if (err instanceof OutboxError)
				return fail(err.status, {
					resendError: { id, message: err.message, reason: form.data.reason }
				});
			throw err;
		}
		redirect(303, `/admin/mail?resent=${form.data.id}`);
	}
};
