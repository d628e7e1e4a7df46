// "My messages": the outbox rows sent to a person or about them, and nobody else's.
import { and, desc, eq, or } from 'drizzle-orm';
import { alias } from 'drizzle-orm/mysql-core';
import { db } from '../db';
import { mailOutbox, people } from '../db/schema';
import { MAX_ATTEMPTS, type MailKind } from './outbox';
import type { MessageStatus } from '../../mail-status';

export type { MessageStatus };

export const MAIL_KIND_LABELS: Record<MailKind, string> = {
	review_requested: 'Review requested',
	retraining_needed: 'Retraining needed',
	assignment: 'Training assigned',
	expiring_30: 'Certificate expiring',
	expiring_7: 'Certificate expiring soon',
	suspended: 'Certificate suspended',
	supervised_run: 'Supervised run',
	lead_digest: 'Daily crew digest'
};

export interface MessageSummary {
	id: number;
	kind: MailKind;
	kindLabel: string;
	subject: string;
	status: MessageStatus;
	/** When it was sent, or queued when not sent yet. */
	at: Date;
	/** "you", or the name of the lead it went to for this person. */
	recipient: string;
}

export interface MessageDetail extends MessageSummary {
	text: string;
	/** Why it could not be delivered, in words fit for the person (failed only). */
	problem: string | null;
}

const recipientPerson = alias(people, 'mail_recipient');

function statusOf(r: {
	sentAt: Date | null;
	attempts: number;
	claimedBy: string | null;
}): MessageStatus {
	if (r.sentAt) return 'sent';
	if (r.attempts >= MAX_ATTEMPTS) return 'failed';
	if (r.claimedBy?.startsWith('digest')) return 'digest';
	return r.attempts > 0 ? 'retrying' : 'pending';
}

const visibleTo = (personId: number) =>
	or(eq(mailOutbox.toPersonId, personId), eq(mailOutbox.aboutPersonId, personId));

const columns = {
	id: mailOutbox.id,
	kind: mailOutbox.kind,
	subject: mailOutbox.subject,
	sentAt: mailOutbox.sentAt,
	createdAt: mailOutbox.createdAt,
	attempts: mailOutbox.attempts,
	claimedBy: mailOutbox.claimedBy,
	toPersonId: mailOutbox.toPersonId,
	toName: recipientPerson.displayName
};

function summary(personId: number, r: Awaited<ReturnType<typeof selectRows>>[number]) {
	return {
		id: r.id,
		kind: r.kind,
		kindLabel: MAIL_KIND_LABELS[r.kind],
		subject: r.subject,
		status: statusOf(r),
		at: r.sentAt ?? r.createdAt,
		recipient:
			r.toPersonId === personId ? 'you' : r.toName ? `your line lead ${r.toName}` : 'nobody'
	} satisfies MessageSummary;
}

function selectRows(personId: number, id?: number) {
	return db
		.select(columns)
		.from(mailOutbox)
		.leftJoin(recipientPerson, eq(recipientPerson.id, mailOutbox.toPersonId))
		.where(id == null ? visibleTo(personId) : and(eq(mailOutbox.id, id), visibleTo(personId)))
		.orderBy(desc(mailOutbox.createdAt), desc(mailOutbox.id))
		.limit(200);
}

/** The newest 200 messages sent to or about the person. */
export async function messagesFor(personId: number): Promise<MessageSummary[]> {
	return (await selectRows(personId)).map((r) => summary(personId, r));
}

/** One message, only when it was sent to or about the person; null otherwise (a 404). */
export async function messageFor(personId: number, id: number): Promise<MessageDetail | null> {
	const [r] = await selectRows(personId, id);
	if (!r) return null;
	const [body] = await db
		.select({
			text: mailOutbox.textBody,
			toAddress: mailOutbox.toAddress,
			lastError: mailOutbox.lastError
		})
		.from(mailOutbox)
		.where(eq(mailOutbox.id, id));
	const s = summary(personId, r);
	return {
		...s,
		text: body.text,
		problem:
			s.status !== 'failed'
				? null
				: body.toAddress === ''
					? body.lastError
					: 'The mail server did not accept it after several tries. An admin can see why under Plant set-up → Mail outbox and send it again.'
	};
}
