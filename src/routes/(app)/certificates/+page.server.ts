import { superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { requireUser } from '$lib/server/auth/guards';
import {
	listCertificates,
	listProcessChoices,
	managesCertificates,
	type CertificateFilter
} from '$lib/server/certificates/register';
import { certificateFilterSchema } from '$lib/schemas/signoffs';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const user = requireUser(event);
	const all = managesCertificates(user);
	const filter = await superValidate(event.url, zod4(certificateFilterSchema));
	const f: CertificateFilter = filter.valid ? filter.data : {};
	return {
		all,
		filter: { q: f.q ?? '', processId: f.processId ?? null, status: f.status ?? null },
		processes: all ? await listProcessChoices() : [],
		certificates: await listCertificates(user, all ? f : {})
	};
};
