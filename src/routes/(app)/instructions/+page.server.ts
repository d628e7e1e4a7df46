import { z } from 'zod';
import { requireUser } from '$lib/server/auth/guards';
import { canAuthor, listRegister } from '$lib/server/instructions';
import { localDate } from '$lib/time';
import type { PageServerLoad } from './$types';

const filterSchema = z.object({
	q: z.string().max(100).catch(''),
	process: z.string().max(32).catch(''),
	station: z.string().max(32).catch(''),
	status: z.enum(['', 'effective', 'scheduled', 'in_review', 'draft', 'withdrawn']).catch('')
});

export const load: PageServerLoad = async (event) => {
	const user = requireUser(event);
	const p = event.url.searchParams;
	const filter = filterSchema.parse({
		q: p.get('q') ?? '',
		process: p.get('process') ?? '',
		station: p.get('station') ?? '',
		status: p.get('status') ?? ''
	});
	const all = await listRegister(user.roles);
	const rows = await listRegister(user.roles, filter);
	return {
		rows,
		filter,
		processes: [...new Set(all.map((r) => r.process).filter((x): x is string => !!x))].sort(),
		stations: [...new Set(all.flatMap((r) => r.stations))].sort(),
		canAuthor: canAuthor(user.roles),
		today: localDate(new Date(), user.timeZone),
		showStates: user.roles.some((r) => r === 'trainer' || r === 'quality' || r === 'admin')
	};
};
