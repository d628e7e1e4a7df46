import { redirect } from '@sveltejs/kit';
import { setError, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { requireRole, requireUser } from '$lib/server/auth/guards';
import { previewTrainingRecords, recordsChoices, resolveRecordsFilter } from '$lib/server/records';
import { hasAnyRole } from '$lib/roles';
import { RECORDS_ROLES } from '$lib/records/training-records';
import { recordsFilterSchema, type RecordsFilterInput } from '$lib/schemas/records';
import type { PageServerLoad } from './$types';

const PREVIEW_ROWS = 50;

export const load: PageServerLoad = async (event) => {
	// Admins reach the Records area for retention only.
	const signedIn = requireUser(event);
	if (!hasAnyRole(signedIn.roles, RECORDS_ROLES) && signedIn.roles.includes('admin'))
		redirect(303, '/records/retention');
	const user = requireRole(event, ...RECORDS_ROLES);
	const form = await superValidate(event.url, zod4(recordsFilterSchema));
	const choices = await recordsChoices(user.siteId);
	let preview = null;
	if (form.valid) {
		const resolved = await resolveRecordsFilter(form.data, user.siteId, user.timeZone);
		if (resolved.ok) preview = await previewTrainingRecords(resolved.filter, PREVIEW_ROWS);
		else {
			for (const [field, message] of Object.entries(resolved.fields))
				setError(form, field as keyof RecordsFilterInput, message);
		}
	}
	return { form, choices, preview, previewRows: PREVIEW_ROWS };
};
