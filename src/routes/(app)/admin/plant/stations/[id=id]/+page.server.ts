import { error, fail } from '@sveltejs/kit';
import { message, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { superValidatePosted } from '$lib/server/forms';
import { actorFrom } from '$lib/server/audit';
import { requireRole } from '$lib/server/auth/guards';
import { getStation, stationFormChoices, updateStation } from '$lib/server/plant';
import { activeActions, activeForm, fieldFailure } from '$lib/server/plant/forms';
import { stationSchema } from '$lib/schemas/plant';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const admin = requireRole(event, 'admin');
	const station = await getStation(Number(event.params.id), admin.siteId);
	if (!station) error(404, { message: 'No such station' });
	return {
		station: { id: station.id, code: station.code, name: station.name, active: station.active },
		form: await superValidate(station, zod4(stationSchema), { errors: false }),
		activeForm: await activeForm(),
		choices: await stationFormChoices(admin.siteId, station),
		created: event.url.searchParams.has('created')
	};
};

export const actions: Actions = {
	save: async (event) => {
		const admin = requireRole(event, 'admin');
		const station = await getStation(Number(event.params.id), admin.siteId);
		if (!station) error(404, { message: 'No such station' });
		const form = await superValidatePosted(event.request, zod4(stationSchema));
		if (!form.valid) return fail(400, { form });
		try {
			const changed = await updateStation(actorFrom(event), station.id, form.data, admin.siteId);
			return message(form, changed ? 'Saved.' : 'Nothing changed.');
		} catch (err) {
			return fieldFailure(form, err);
		}
	},
	...activeActions('station', getStation)
};
