// Guard-matrix rows for the admins' view of the mail outbox.
import type { GuardRoute } from './guard-routes';

export const GUARD_ROUTES: GuardRoute[] = [
	{ method: 'GET', path: '/admin/mail', allowedRoles: ['admin'] },
	{
		// No reason given: an admin gets the field message back (400), nothing is queued again.
		method: 'POST',
		path: '/admin/mail?/resend',
		allowedRoles: ['admin'],
		form: { id: '1', reason: '' },
		allowed: { status: 400 }
	}
];
