import { superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { requireRole } from '$lib/server/auth/guards';
import { HISTORY_ROLES } from '$lib/server/records/access';
import { listRecordLines, listRecordPeople } from '$lib/server/records/history';
import { recordPeopleFilterSchema } from '$lib/schemas/records-history';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	requireRole(event, ...HISTORY_ROLES);
	const form = await superValidate(event.url, zod4(recordPeopleFilterSchema));
	const lines = await listRecordLines();
	const line = lines.find((l) => l.code === form.data.line);
	if (form.valid && form.data.line && !line) form.errors.line = [`No line ${form.data.line}.`];
	const list =
		form.valid && !form.errors.line
			? await listRecordPeople({
					q: form.data.q || undefined,
					lineId: line?.id,
					status: form.data.status || undefined
				})
			: { people: [], more: false };
	return { form, lines, ...list };
};
