import { requireRole } from '$lib/server/auth/guards';
import { listRuleOverview } from '$lib/server/training/rules';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const user = requireRole(event, 'quality', 'admin');
	const rows = await listRuleOverview();
	return {
		canEdit: user.roles.includes('quality'),
		processes: rows.map((r) => ({
			id: r.id,
			code: r.code,
			name: r.name,
			active: r.active,
			versions: r.versions,
			version: r.inForce?.version ?? null,
			activeFrom: r.inForce?.activeFrom ?? null,
			summary: r.inForce?.summary ?? null,
			scheduled: r.scheduled
		}))
	};
};
