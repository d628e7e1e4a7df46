import { error, fail, redirect, type RequestEvent } from '@sveltejs/kit';
import { setError, superValidate, type SuperValidated } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { actorFrom } from '../audit';
import { requireRole } from '../auth/guards';
import { deactivateSchema } from '../../schemas/people';
import { ConflictError, PlantRuleError, setPlantActive, type Deactivatable } from './common';

/**
 * A taken code (409) or a broken plant rule (400) becomes an error on its field, and the form
 * goes back with everything typed; anything else is unexpected and rethrown.
 */
export function fieldFailure<T extends Record<string, unknown>>(
	form: SuperValidated<T>,
	err: unknown
) {
	if (err instanceof ConflictError || err instanceof PlantRuleError) {
		// superforms keeps an array's own errors under `_errors`.
		const path = Array.isArray(form.data[err.field]) ? `${err.field}._errors` : err.field;
		return setError(form, path as never, err.message, {
			status: err instanceof ConflictError ? 409 : 400
		});
	}
	throw err;
}

/** The empty deactivate/reactivate form an edit page shows. */
export const activeForm = () => superValidate(zod4(deactivateSchema), { id: 'active' });

/**
 * The `deactivate` and `reactivate` actions of an edit page: admin only, a reason required,
 * 404 when `find` does not see the row in the admin's site.
 */
export function activeActions(
	kind: Deactivatable,
	find: (id: number, siteId: number | null) => Promise<{ id: number } | null>
) {
	const act = (active: boolean) => async (event: RequestEvent) => {
		const admin = requireRole(event, 'admin');
		const row = await find(Number(event.params.id), admin.siteId);
		if (!row) error(404, { message: `No such ${kind}` });
		const form = await superValidate(event.request, zod4(deactivateSchema), { id: 'active' });
		if (!form.valid) return fail(400, { activeForm: form });
		await setPlantActive(actorFrom(event), kind, row.id, active, form.data.reason);
		redirect(303, event.url.pathname);
	};
	return { deactivate: act(false), reactivate: act(true) };
}
