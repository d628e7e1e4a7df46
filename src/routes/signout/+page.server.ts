import { redirect } from '@sveltejs/kit';
import { clearSessionCookie } from '$lib/server/auth/authjs';
import { revokeSession } from '$lib/server/auth/sessions';
import { recordAuditNow } from '$lib/server/audit';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = () => redirect(303, '/');

export const actions: Actions = {
	default: async (event) => {
		const { locals } = event;
		if (locals.sessionId) await revokeSession(locals.sessionId);
		if (locals.user) {
			await recordAuditNow(
				{ id: locals.user.id, label: locals.user.displayName, address: event.getClientAddress() },
				{ action: 'auth.signout', entityType: 'person', entityId: locals.user.id }
			);
		}
		await clearSessionCookie(event);
		redirect(303, '/signin?signedOut=1');
	}
};
