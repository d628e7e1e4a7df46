import { json } from '@sveltejs/kit';
import { checkDatabase } from '$lib/server/health';

/** Liveness and database reachability for load balancers and monitoring. */
export async function GET() {
	const database = await checkDatabase();
	return json(
		{ status: database.up ? 'ok' : 'degraded', database },
		{ status: database.up ? 200 : 503, headers: { 'cache-control': 'no-store' } }
	);
}
