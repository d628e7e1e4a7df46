import { and, eq, gt, lt, sql } from 'drizzle-orm';
import { db } from '../db';
import { signInFailures } from '../db/schema';
import { config } from '../config';

type KeyType = 'account' | 'address';

const windowStart = () => new Date(Date.now() - config.throttle.windowMinutes * 60_000);

async function failuresSince(keyType: KeyType, keyValue: string): Promise<number> {
	const [row] = await db
		.select({ n: sql<number>`count(*)` })
		.from(signInFailures)
		.where(
			and(
				eq(signInFailures.keyType, keyType),
				eq(signInFailures.keyValue, keyValue),
				gt(signInFailures.at, windowStart())
			)
		);
	return Number(row?.n ?? 0);
}

/** True when the account or the address has used up its failed tries in the current window. */
export async function isThrottled(account: string, address: string): Promise<boolean> {
	const [a, b] = await Promise.all([
		failuresSince('account', account),
		failuresSince('address', address)
	]);
	return a >= config.throttle.perAccount || b >= config.throttle.perAddress;
}

/** Counts one failed try against both the typed account name and the client address. */
export async function recordSignInFailure(account: string, address: string): Promise<void> {
	await db.insert(signInFailures).values([
		{ keyType: 'account', keyValue: account },
		{ keyType: 'address', keyValue: address }
	]);
	// Old rows are only noise; trim them now and then rather than on a schedule.
	if (Math.random() < 0.02) {
		await db.delete(signInFailures).where(lt(signInFailures.at, new Date(Date.now() - 86_400_000)));
	}
}

/** A successful sign-in forgives the account's earlier failures (not the address's). */
export async function clearAccountFailures(account: string): Promise<void> {
	await db
		.delete(signInFailures)
		.where(and(eq(signInFailures.keyType, 'account'), eq(signInFailures.keyValue, account)));
}
