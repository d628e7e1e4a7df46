import { error, fail, redirect } from '@sveltejs/kit';
import { actorFrom } from '$lib/server/audit';
import { requireRole } from '$lib/server/auth/guards';
import { Refusal } from '$lib/server/errors';
import {
	CHECK_AUTHOR_ROLES,
	CHECK_VIEWER_ROLES,
	createNextVersion,
	getCheck
} from '$lib/server/training/checks';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const user = requireRole(event, ...CHECK_VIEWER_ROLES);
	const check = await getCheck(Number(event.params.id));
	if (!check) error(404, { message: 'No such knowledge check.' });
	return { check, canAuthor: user.roles.includes('trainer') };
};

export const actions: Actions = {
	newVersion: async (event) => {
		const user = requireRole(event, ...CHECK_AUTHOR_ROLES);
		const checkId = Number(event.params.id);
		let v: { id: number };
		try {
			v = await createNextVersion({ ...actorFrom(event), id: user.id }, checkId);
		} catch (err) {
			if (err instanceof Refusal) {
				if (err.status === 404) error(404, { message: err.message });
				return fail(err.status, { message: err.message });
			}
			throw err;
		}
		redirect(303, `/checks/${checkId}/versions/${v.id}`);
	}
};
