import { eq } from 'drizzle-orm';
import { db } from '../db';
import { people, sites } from '../db/schema';
import { hasContractEnded } from '../../employment';
import { recordAuditNow } from '../audit';
import { verifySecret } from './password';
import { beginSignInTry, settleSuccessfulTry, trimOldFailures } from './throttle';
import { openSession } from './sessions';

export type SignInMethod = 'password' | 'badge';

export type SignInResult =
	| { ok: true; personId: number; displayName: string; sessionId: string }
	| { ok: false; reason: 'invalid' | 'throttled' };

/**
 * Checks an e-mail + password or badge + PIN. Unknown accounts, wrong secrets, inactive people and
 * agency staff past their contract's end all answer 'invalid' after the same amount of work; too
 * many failures answer 'throttled' without checking the secret at all.
 */
export async function attemptSignIn(
	method: SignInMethod,
	identifier: string,
	secret: string,
	address: string
): Promise<SignInResult> {
	const account = `${method}:${identifier.trim().toLowerCase()}`;
	const column = method === 'password' ? people.email : people.badgeNo;
	const [person] = await db
		.select({
			id: people.id,
			displayName: people.displayName,
			active: people.active,
			sessionVersion: people.sessionVersion,
			contractEndsOn: people.contractEndsOn,
			timeZone: sites.timeZone,
			passwordHash: people.passwordHash,
			pinHash: people.pinHash
		})
		.from(people)
		.leftJoin(sites, eq(sites.id, people.siteId))
		.where(eq(column, identifier.trim()))
		.limit(1);
	const refuse = async (reason: 'invalid' | 'throttled'): Promise<SignInResult> => {
		await recordAuditNow(
			{ id: null, label: identifier, address },
			{
				action: reason === 'throttled' ? 'auth.signin_throttled' : 'auth.signin_failed',
				entityType: 'person',
				entityId: person?.id ?? null,
				reason: method
			}
		);
		return { ok: false, reason };
	};
	const attempt = await beginSignInTry(account, address, person?.id ?? null);
	if (attempt.throttled) return refuse('throttled');
	const stored = method === 'password' ? person?.passwordHash : person?.pinHash;
	const usable =
		person?.active && !hasContractEnded(person.contractEndsOn, person.timeZone ?? 'UTC');
	const good = await verifySecret(usable ? stored : null, secret);
	if (!person || !good) {
		await trimOldFailures();
		return refuse('invalid');
	}
	await settleSuccessfulTry(account, attempt);
	const sessionId = await openSession(person.id, person.sessionVersion, method, address);
	await recordAuditNow(
		{ id: person.id, label: person.displayName, address },
		{ action: 'auth.signin', entityType: 'person', entityId: person.id, reason: method }
	);
	return { ok: true, personId: person.id, displayName: person.displayName, sessionId };
}
