import { pool } from './db';

/** Pings MariaDB with a short deadline, so the answer is quick even when it hangs. */
export async function checkDatabase(
	timeoutMs = 1500
): Promise<{ up: boolean; latencyMs: number | null }> {
	const started = performance.now();
	let timer: NodeJS.Timeout | undefined;
	try {
		await Promise.race([
			pool.query('SELECT 1'),
			new Promise((_, reject) => {
				timer = setTimeout(() => reject(new Error('timeout')), timeoutMs);
			})
		]);
		return { up: true, latencyMs: Math.round(performance.now() - started) };
	} catch {
		return { up: false, latencyMs: null };
	} finally {
		clearTimeout(timer);
	}
}
