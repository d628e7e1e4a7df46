// Re-authentication at the moment of signing or acknowledging: the person's own password (or PIN,
// for badge users) again, throttled per person, every failure audited.
import { and, count, eq, gte } from 'drizzle-orm';
import { db } from '../db';
import { people, signatureFailures } from '../db/schema';
import { recordAuditNow, type Actor } from '../audit';
import { Refusal } from '../errors';
import { verifySecret } from './password';

/** Failures within the window before signing is refused for a while (and an alert is audited). */
export const REAUTH_MAX_FAILURES = 5;
export const REAUTH_ALERT_AT = 3;
const WINDOW_MS = 15 * 60_000;

export type ReauthMethod = 'password' | 'pin';

export interface ReauthEntity {
	type: string;
	id: number;
	label: string;
}

/**
 * Checks the person's own secret. With `allow` containing 'pin', a PIN is accepted as well as a
 * password (shop-floor people often have only a badge and PIN). A wrong secret is refused, counted
 * and audited; after REAUTH_ALERT_AT failures an alert is audited, after REAUTH_MAX_FAILURES the
 * person cannot sign until the window passes.
 */
export async function reauthenticate(
	actor: Actor & { id: number },
	secret: string,
	entity: ReauthEntity,
	allow: readonly ReauthMethod[] = ['password']
): Promise<{ printedName: string; method: ReauthMethod }> {
	const since = new Date(Date.now() - WINDOW_MS);
	const [{ n }] = await db
		.select({ n: count() })
		.from(signatureFailures)
		.where(and(eq(signatureFailures.personId, actor.id), gte(signatureFailures.at, since)));
	if (n >= REAUTH_MAX_FAILURES) {
		await recordAuditNow(actor, {
			action: 'signature.locked',
			entityType: entity.type,
			entityId: entity.id,
			newValues: { failuresInWindow: n, record: entity.label },
			reason: 'signing refused after repeated wrong secrets'
		});
		throw new Refusal(
			429,
			'Signing is locked after repeated wrong entries. Wait 15 minutes or ask an admin.'
		);
	}
	const [me] = await db
		.select({
			displayName: people.displayName,
			passwordHash: people.passwordHash,
			pinHash: people.pinHash
		})
		.from(people)
		.where(eq(people.id, actor.id));
	let method: ReauthMethod | null = null;
	if (
		allow.includes('password') &&
		me?.passwordHash &&
		(await verifySecret(me.passwordHash, secret))
	)
		method = 'password';
	else if (allow.includes('pin') && me?.pinHash && (await verifySecret(me.pinHash, secret)))
		method = 'pin';
	else if (!me?.passwordHash && !me?.pinHash) await verifySecret(null, secret);
	if (!method) {
		await db.insert(signatureFailures).values({ personId: actor.id });
		const failures = n + 1;
		await recordAuditNow(actor, {
			action: failures >= REAUTH_ALERT_AT ? 'signature.failures_alert' : 'signature.failed',
			entityType: entity.type,
			entityId: entity.id,
			newValues: { failuresInWindow: failures, record: entity.label },
			reason: 'wrong secret at signature'
		});
		const what = allow.includes('pin') ? 'password or PIN' : 'password';
		throw new Refusal(400, `That ${what} did not match. Nothing was signed.`, {
			password: `Wrong ${what}.`
		});
	}
	return { printedName: me!.displayName, method };
}
