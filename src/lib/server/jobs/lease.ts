// Job leases in the database: whichever app instance takes the lease runs the job; the others skip
// it until the lease runs out. Works with any number of instances on one database.
import { hostname } from 'node:os';
import { randomUUID } from 'node:crypto';
import { and, eq, isNull, lte, or } from 'drizzle-orm';
import { db } from '../db';
import { jobLeases } from '../db/schema';
import { config } from '../config';

/** This process's name in lease rows (PADBRIDGE_INSTANCE first, when set). */
export const INSTANCE_ID = `${config.instanceName ?? hostname()}:${process.pid}:${randomUUID().slice(0, 8)}`;

const affected = (res: unknown) => (res as [{ affectedRows: number }])[0].affectedRows;

/**
 * Takes the lease on `name` for `leaseMs` when nobody holds an unexpired one. Returns true for the
 * single taker. A lease is not released early: it also spaces the runs across instances.
 */
export async function takeLease(
	name: string,
	leaseMs: number,
	now: Date = new Date(),
	holder: string = INSTANCE_ID
): Promise<boolean> {
	await db.insert(jobLeases).ignore().values({ name });
	const res = await db
		.update(jobLeases)
		.set({ holder, leaseUntil: new Date(now.getTime() + leaseMs) })
		.where(
			and(
				eq(jobLeases.name, name),
				or(isNull(jobLeases.leaseUntil), lte(jobLeases.leaseUntil, now))
			)
		);
	return affected(res) === 1;
}

export async function recordJobRun(name: string, result: string, at: Date = new Date()) {
	await db
		.update(jobLeases)
		.set({ lastRunAt: at, lastResult: result })
		.where(eq(jobLeases.name, name));
}
