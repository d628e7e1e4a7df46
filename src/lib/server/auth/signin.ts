import { eq } from 'drizzle-orm';
import { db } from '../db';
import { people } from '../db/schema';
import { recordAuditNow } from '../audit';
import { verifySecret } from './password';
import { clearAccountFailures, isThrottled, recordSignInFailure } from './throttle';
import { openSession } from './sessions';

export type SignInMethod = 'password' | 'badge';

export type SignInResult =
	| { ok: true; personId: number; displayName: string; sessionId: string }
	| { ok: false; reason: 'invalid' | 'throttled' };

/**
 * Checks an e-mail + password or badge + PIN. Unknown accounts, wrong secrets and inactive people
 * all answer 'invalid' after the same amount of work; too many failures answer 'throttled'.
 */
export async function attemptSignIn(
	method: SignInMethod,
	identifier: string,
	secret: string,
	address: string
): Promise<SignInResult> {
	const account = `${method}:${identifier.trim().toLowerCase()}`;
	if (await isThrottled(account, address)) {
		await recordAuditNow(
			{ id: null, label: identifier, address },
			{ action: 'auth.signin_throttled', entityType: 'person', reason: method }
		);
		return { ok: false, reason: 'throttled' };
	}
	const column = method === 'password' ? people.email : people.badgeNo;
	const [person] = await db
		.select({
			id: people.id,
			displayName: people.displayName,
			active: people.active,
			sessionVersion: people.sessionVersion,
			passwordHash: people.passwordHash,
			pinHash: people.pinHash
		})
		.from(people)
		.where(eq(column, identifier.trim()))
		.limit(1);
	const stored = method === 'password' ? person?.passwordHash : person?.pinHash;
	const good = await verifySecret(person?.active ? stored : null, secret);
	if (!person || !good) {
		await recordSignInFailure(account, address);
		await recordAuditNow(
			{ id: null, label: identifier, address },
			{
				action: 'auth.signin_failed',
				entityType: 'person',
				entityId: person?.id ?? null,
				reason: method
			}
		);
		return { ok: false, reason: 'invalid' };
	}
	await clearAccountFailures(account);
	const sessionId = await openSession(person.id, person.sessionVersion, method, address);
	await recordAuditNow(
		{ id: person.id, label: person.displayName, address },
		{ action: 'auth.signin', entityType: 'person', entityId: person.id, reason: method }
	);
	return { ok: true, personId: person.id, displayName: person.displayName, sessionId };
}
