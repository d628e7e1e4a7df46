import { error, redirect } from '@sveltejs/kit';
import type { Role } from '../../roles';
import type { SessionUser } from './sessions';

type WithUser = { locals: App.Locals; url: URL };

/** A failed read of the signed-in person is an error of this request, never "signed out". */
function throwUserLoadError(event: WithUser): void {
	if (event.locals.userLoadError) throw event.locals.userLoadError;
}

/** The signed-in person, or a redirect to sign-in that comes back to this page. */
export function requireUser(event: WithUser): SessionUser {
	throwUserLoadError(event);
	const user = event.locals.user;
	if (!user) {
		const back = event.url.pathname + event.url.search;
		redirect(303, `/signin?redirectTo=${encodeURIComponent(back)}`);
	}
	return user;
}

/** The signed-in person holding at least one of `roles`; 403 otherwise. */
export function requireRole(event: WithUser, ...roles: Role[]): SessionUser {
	const user = requireUser(event);
	if (!roles.some((r) => user.roles.includes(r))) {
		error(403, {
			message: `This page is for ${roles.join(', ')}. Your roles: ${user.roles.join(', ') || 'none'}.`
		});
	}
	return user;
}

/** For JSON endpoints: 401 instead of a redirect when nobody is signed in. */
export function requireApiRole(event: WithUser, ...roles: Role[]): SessionUser {
	throwUserLoadError(event);
	const user = event.locals.user;
	// API errors carry `error` as well as SvelteKit's `message`, matching the { error, fields } shape.
	if (!user) error(401, { message: 'Sign in first.', error: 'Sign in first.' });
	if (roles.length && !roles.some((r) => user.roles.includes(r))) {
		const text = `Needs one of the roles: ${roles.join(', ')}.`;
		error(403, { message: text, error: text });
	}
	return user;
}
