// The in-app scheduler: every app instance ticks, and a lease in the database decides which one
// runs each job, so a job runs once per interval however many instances there are.
import { runCertificateLifecycle } from '../certificates/lifecycle';
import { queueLeadDigests } from '../mail/digest';
import { queueExpiryReminders } from '../mail/reminders';
import { sendPendingMail } from '../mail/send';
import { endExpiredContracts } from '../people/leavers';
import { runRetention } from '../records/retention';
import { recordJobRun, takeLease } from './lease';

export interface Job {
	name: string;
	intervalMs: number;
	run: (now: Date) => Promise<unknown>;
}

export const JOBS: Job[] = [
	{ name: 'certificate-lifecycle', intervalMs: 60_000, run: (now) => runCertificateLifecycle(now) },
	// Claims rows itself, so it would be safe on every instance; the lease just spaces the runs.
	{ name: 'mail-send', intervalMs: 30_000, run: (now) => sendPendingMail(now) },
	{ name: 'mail-reminders', intervalMs: 10 * 60_000, run: (now) => queueExpiryReminders(now) },
	// Hourly; each lead's digest goes once per plant day from 06:00 plant time (dedupe key).
	{ name: 'mail-digest', intervalMs: 60 * 60_000, run: (now) => queueLeadDigests(now) },
	// Agency contracts end at the end of their last day in the plant's zone; idempotent.
	{ name: 'contract-ends', intervalMs: 60_000, run: (now) => endExpiredContracts(now) },
	// Daily and for real: anonymises people past retention and purges old gate log rows.
	{
		name: 'retention',
		intervalMs: 24 * 60 * 60_000,
		run: async (now) => {
			const { runId, summary } = await runRetention({ dryRun: false, actor: null, now });
			return { runId, ...summary.applied };
		}
	}
];

/** Runs every job whose lease this instance can take now; errors are recorded, not thrown. */
export async function tick(now: Date = new Date(), jobs: Job[] = JOBS) {
	for (const job of jobs) {
		// The lease is a little shorter than the interval so the next tick can take it on time.
		if (!(await takeLease(job.name, job.intervalMs - 1_000, now))) continue;
		try {
			const result = await job.run(now);
			await recordJobRun(job.name, JSON.stringify(result ?? null), now);
		} catch (err) {
			await recordJobRun(job.name, `failed: ${(err as Error).message}`, now).catch(() => {});
			console.error(`job ${job.name} failed`, err);
		}
	}
}

let timer: NodeJS.Timeout | null = null;

/** Starts ticking every 15 s (the jobs' own intervals space their runs). */
export function startScheduler() {
	if (timer) return;
	const loop = () => tick().catch((err) => console.error('scheduler tick failed', err));
	timer = setInterval(loop, 15_000);
	timer.unref();
	setTimeout(loop, 2_000).unref();
}

export function stopScheduler() {
	if (timer) clearInterval(timer);
	timer = null;
}
