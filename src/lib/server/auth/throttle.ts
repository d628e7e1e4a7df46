import { and, eq, gt, inArray, lt, lte, or, sql } from 'drizzle-orm';
import { db, type Tx } from '../db';
import { people, signInFailures } from '../db/schema';
import { config } from '../config';

type KeyType = 'account' | 'address';

const windowStart = () => new Date(Date.now() - config.throttle.windowMinutes * 60_000);

/** Tries against a key in the current window, up to and including the row `upToId`. */
async function triesUpTo(tx: Tx, keyType: KeyType, keyValue: string, upToId: number) {
	const [row] = await tx
		.select({ n: sql<number>`count(*)` })
		.from(signInFailures)
		.where(
			and(
				eq(signInFailures.keyType, keyType),
				eq(signInFailures.keyValue, keyValue),
				gt(signInFailures.at, windowStart()),
				lte(signInFailures.id, upToId)
			)
		);
	return Number(row?.n ?? 0);
}

export interface SignInTry {
	/** True when earlier failures used up the account's or the address's tries. */
	throttled: boolean;
	/** The two rows that count this try as a failure until it succeeds. */
	rowIds: number[];
}

/**
 * Counts a sign-in try as a failure BEFORE its secret is checked, so tries that arrive together
 * cannot all slip under the limit. Tries of one known person queue on their people row, which
 * makes the per-account limit exact; the per-address limit is counted in arrival order. A refused
 * try is taken back at once: only checked tries use up the allowance.
 */
export async function beginSignInTry(
	account: string,
	address: string,
	personId: number | null
): Promise<SignInTry> {
	return db.transaction(async (tx) => {
		if (personId !== null) {
			await tx.select({ id: people.id }).from(people).where(eq(people.id, personId)).for('update');
		}
		const [a] = await tx
			.insert(signInFailures)
			.values({ keyType: 'account', keyValue: account })
			.$returningId();
		const [b] = await tx
			.insert(signInFailures)
			.values({ keyType: 'address', keyValue: address })
			.$returningId();
		const rowIds = [a.id, b.id];
		const throttled =
			(await triesUpTo(tx, 'account', account, a.id)) > config.throttle.perAccount ||
			(await triesUpTo(tx, 'address', address, b.id)) > config.throttle.perAddress;
		if (throttled) await tx.delete(signInFailures).where(inArray(signInFailures.id, rowIds));
		return { throttled, rowIds };
	});
}

/** Occasionally drops rows far outside any window; they are only noise. */
export async function trimOldFailures(): Promise<void> {
	if (Math.random() < 0.02) {
		await db.delete(signInFailures).where(lt(signInFailures.at, new Date(Date.now() - 86_400_000)));
	}
}

/**
 * A successful sign-in takes back its own try and forgives the account's earlier failures (not
 * the address's: one right password does not excuse guessing at other accounts).
 */
export async function settleSuccessfulTry(account: string, attempt: SignInTry): Promise<void> {
	await db
		.delete(signInFailures)
		.where(
			or(
				inArray(signInFailures.id, attempt.rowIds),
				and(eq(signInFailures.keyType, 'account'), eq(signInFailures.keyValue, account))
			)
		);
}
