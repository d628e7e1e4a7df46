// The outbox as admins see it (/admin/mail): how many messages stand where, the ones that were
// given up with the reason, and "send again" for a message the mail server refused, once the
// cause (a full mailbox, a relay that was down, a wrong address since corrected) is dealt with.
import { and, desc, eq, gte, isNull, ne, sql } from 'drizzle-orm';
import { alias } from 'drizzle-orm/mysql-core';
import { db } from '../db';
import { mailOutbox, people } from '../db/schema';
import { recordAudit, type Actor } from '../audit';
import { MAX_ATTEMPTS, DIGEST_HOLD, type MailKind } from './outbox';
import { MAIL_KIND_LABELS } from './messages';

export interface OutboxCounts {
	sent: number;
	pending: number;
	retrying: number;
	digest: number;
	/** The mail server refused them MAX_ATTEMPTS times, or refused them for good. */
	failed: number;
	/** Nobody to send to: no address for the person and no line lead with one. */
	undeliverable: number;
}

export type OutboxProblem = {
	id: number;
	kind: MailKind;
	kindLabel: string;
	subject: string;
	toAddress: string;
	toName: string | null;
	aboutName: string | null;
	createdAt: Date;
	attempts: number;
	lastError: string | null;
	/** True when a mail server refused it (it can be sent again); false when there was nobody. */
	canResend: boolean;
};

export class OutboxError extends Error {
	constructor(
		message: string,
		/** 404 for no such message, 409 for one in a state that cannot be sent again. */
		readonly status: 404 | 409 = 409
	) {
		super(message);
	}
}

export async function outboxCounts(): Promise<OutboxCounts> {
	const [r] = await db
		.select({
			sent: sql<string>`SUM(${mailOutbox.sentAt} IS NOT NULL)`,
			pending: sql<string>`SUM(${mailOutbox.sentAt} IS NULL AND ${mailOutbox.attempts} = 0
				AND (${mailOutbox.claimedBy} IS NULL OR ${mailOutbox.claimedBy} NOT LIKE ${DIGEST_HOLD + '%'}))`,
			retrying: sql<string>`SUM(${mailOutbox.sentAt} IS NULL AND ${mailOutbox.attempts} BETWEEN 1 AND ${MAX_ATTEMPTS - 1})`,
			digest: sql<string>`SUM(${mailOutbox.sentAt} IS NULL AND ${mailOutbox.attempts} = 0
				AND ${mailOutbox.claimedBy} LIKE ${DIGEST_HOLD + '%'})`,
			failed: sql<string>`SUM(${mailOutbox.sentAt} IS NULL AND ${mailOutbox.attempts} >= ${MAX_ATTEMPTS} AND ${mailOutbox.toAddress} <> '')`,
			undeliverable: sql<string>`SUM(${mailOutbox.sentAt} IS NULL AND ${mailOutbox.attempts} >= ${MAX_ATTEMPTS} AND ${mailOutbox.toAddress} = '')`
		})
		.from(mailOutbox);
	const n = (v: string | null) => Number(v ?? 0);
	return {
		sent: n(r.sent),
		pending: n(r.pending),
		retrying: n(r.retrying),
		digest: n(r.digest),
		failed: n(r.failed),
		undeliverable: n(r.undeliverable)
	};
}

const toPerson = alias(people, 'outbox_to');
const aboutPerson = alias(people, 'outbox_about');

/** The newest 200 messages that were given up, failed ones first. */
export async function outboxProblems(): Promise<OutboxProblem[]> {
	const rows = await db
		.select({
			id: mailOutbox.id,
			kind: mailOutbox.kind,
			subject: mailOutbox.subject,
			toAddress: mailOutbox.toAddress,
			toName: toPerson.displayName,
			aboutName: aboutPerson.displayName,
			createdAt: mailOutbox.createdAt,
			attempts: mailOutbox.attempts,
			lastError: mailOutbox.lastError
		})
		.from(mailOutbox)
		.leftJoin(toPerson, eq(toPerson.id, mailOutbox.toPersonId))
		.leftJoin(aboutPerson, eq(aboutPerson.id, mailOutbox.aboutPersonId))
		.where(and(isNull(mailOutbox.sentAt), gte(mailOutbox.attempts, MAX_ATTEMPTS)))
		.orderBy(sql`${mailOutbox.toAddress} = ''`, desc(mailOutbox.createdAt), desc(mailOutbox.id))
		.limit(200);
	return rows.map((r) => ({
		...r,
		kindLabel: MAIL_KIND_LABELS[r.kind],
		canResend: r.toAddress !== ''
	}));
}

/**
 * Puts a failed message back in the queue: the worker sends it on its next tick with the same
 * Message-ID. Only a message a mail server refused can be sent again; one with nobody to send to
 * stays as it is (give the person an address, or their line a lead with one, instead).
 */
export async function resendMail(actor: Actor, id: number, reason: string): Promise<void> {
	await db.transaction(async (tx) => {
		const [row] = await tx
			.select({
				id: mailOutbox.id,
				toAddress: mailOutbox.toAddress,
				attempts: mailOutbox.attempts,
				sentAt: mailOutbox.sentAt,
				lastError: mailOutbox.lastError
			})
			.from(mailOutbox)
			.where(eq(mailOutbox.id, id))
			.for('update');
		if (!row) throw new OutboxError('There is no such message.', 404);
		if (row.sentAt) throw new OutboxError('This message was sent already.');
		if (row.attempts < MAX_ATTEMPTS)
			throw new OutboxError('This message is still being tried; it is not failed.');
		if (row.toAddress === '')
			throw new OutboxError(
				'This message had nobody to go to; sending it again would change nothing. Give the person an e-mail address, or their line a lead with one.'
			);
		const now = new Date();
		const note = `sent again by ${actor.label}; before: ${row.lastError ?? '—'}`;
		await tx
			.update(mailOutbox)
			.set({
				attempts: 0,
				sendAfter: now,
				claimedBy: null,
				claimedUntil: null,
				lastError: note.slice(0, 2000)
			})
			.where(and(eq(mailOutbox.id, id), isNull(mailOutbox.sentAt), ne(mailOutbox.toAddress, '')));
		await recordAudit(tx, actor, {
			action: 'mail.resend',
			entityType: 'mail_outbox',
			entityId: id,
			oldValues: { attempts: row.attempts, lastError: row.lastError },
			newValues: { attempts: 0, sendAfter: now },
			reason
		});
	});
}
