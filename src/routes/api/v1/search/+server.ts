import { json } from '@sveltejs/kit';
import { z } from 'zod';
import { requireApiRole } from '$lib/server/auth/guards';
import { canSeeArchive } from '$lib/server/instructions';
import { searchInstructions } from '$lib/server/search';
import type { RequestHandler } from './$types';

const querySchema = z.object({
	q: z.string().trim().max(100, 'Search for at most 100 characters.'),
	scope: z.enum(['effective', 'all']).default('effective')
});

/** Full-text search: `?q=…&scope=effective|all` (all: drafts and archive, for trainers, quality and admins). */
export const GET: RequestHandler = async (event) => {
	const user = requireApiRole(event);
	const parsed = querySchema.safeParse({
		q: event.url.searchParams.get('q') ?? '',
		scope: event.url.searchParams.get('scope') ?? undefined
	});
	if (!parsed.success)
		return json(
			{
				error: parsed.error.issues[0].message,
				fields: { [String(parsed.error.issues[0].path[0])]: parsed.error.issues[0].message }
			},
			{ status: 400 }
		);
	const { q, scope } = parsed.data;
	if (scope === 'all' && !canSeeArchive(user.roles))
		return json(
			{ error: 'Searching drafts and the archive is for trainers, quality and admins.' },
			{ status: 403 }
		);
	const started = performance.now();
	const results = await searchInstructions(q, scope);
	return json({ q, scope, results, tookMs: Math.round((performance.now() - started) * 10) / 10 });
};
