// The mail outbox: messages are written in the caller's transaction, next to the event that causes
// them, and sent later by the worker (send.ts). The unique dedupe key makes queueing idempotent.
//
// Who receives what:
// - A person with an e-mail address gets the message themselves.
// - A person without one (most operators) is covered through the line lead(s) of their line
//   (people with the role `lead` on the same line, active, with an address; the lead of their own
//   shift first). Urgent kinds (suspended, supervised run) go to each of those leads at once, as a
//   single message "about" the person. Every other kind is held for the leads' daily digest
//   (digest.ts): one row, addressed to the first lead, claimed by the marker `digest` until the day's
//   digest folds it in. If no digest folds it by the end of the hold, the sender sends it as a
//   single message to that lead, so nothing is lost when the digest job does not run.
// - Nobody to send to (no address, no lead with one): the row is still written, already given up
//   (attempts = MAX_ATTEMPTS) with the reason in last_error, so the person and admins can see it.
import { and, eq, isNotNull, ne, sql } from 'drizzle-orm';
import type { Tx } from '../db';
import { lines, mailOutbox, people, roleAssignments, type MAIL_KINDS } from '../db/schema';
import { siteZoneOf } from '../certificates/issue';
import { localDate, zonedToUtc } from '../../time';
import { renderNotice, type MailContent, type NoticeFor } from './templates';

export type MailKind = (typeof MAIL_KINDS)[number];

/** After this many failed tries a row is left as failed (visible, never retried). */
export const MAX_ATTEMPTS = 8;
/** claimed_by of a row waiting for the lead digest. */
export const DIGEST_HOLD = 'digest';
/** Local time from which the day's lead digest goes out. */
export const DIGEST_TIME = '06:00';
/** How long after the digest time a held row waits before it is sent on its own. */
const HOLD_GRACE_MS = 6 * 3_600_000;
/** Kinds that reach a lead at once for a person without e-mail; the rest wait for the digest. */
const URGENT_KINDS: readonly MailKind[] = ['suspended', 'supervised_run'];

type Body = { subject: string; text: string; html: string } | { notice: NoticeFor };

export type QueueMailInput = {
	kind: MailKind;
	/** e.g. expiring_30:certificate:42 — the same event never queues twice. */
	dedupeKey: string;
	/** The person the message is about; by default also the recipient. */
	aboutPersonId?: number | null;
	sendAfter?: Date;
	now?: Date;
} & ({ toPersonId: number; toAddress?: never } | { toAddress: string; toPersonId?: never }) &
	Body;

export interface QueueMailResult {
	/** Rows written now (0 when the same event was already queued). */
	queued: number;
	/** How the message travels. */
	route: 'direct' | 'lead' | 'digest' | 'undeliverable' | 'inactive';
	/** Set when nobody can receive it. */
	reason?: string;
}

const affected = (res: unknown) => (res as [{ affectedRows: number }])[0].affectedRows;

export function addDays(date: string, days: number): string {
	const [y, m, d] = date.split('-').map(Number);
	return new Date(Date.UTC(y, m - 1, d + days)).toISOString().slice(0, 10);
}

/** The next digest instant after `now` in the zone (today's 06:00 if still ahead, else tomorrow's). */
export function nextDigestAt(now: Date, timeZone: string): Date {
	const today = localDate(now, timeZone);
	const at = zonedToUtc(today, DIGEST_TIME, timeZone);
	return at.getTime() > now.getTime() ? at : zonedToUtc(addDays(today, 1), DIGEST_TIME, timeZone);
}

/** Active line leads with an address who cover `personId`, the lead of their own shift first. */
export async function leadsFor(
	tx: Tx,
	person: { id: number; lineId: number | null; shiftId: number | null }
) {
	if (person.lineId == null) return [];
	return tx
		.select({ id: people.id, name: people.displayName, email: people.email })
		.from(people)
		.innerJoin(
			roleAssignments,
			and(eq(roleAssignments.personId, people.id), eq(roleAssignments.role, 'lead'))
		)
		.where(
			and(
				eq(people.lineId, person.lineId),
				eq(people.active, true),
				isNotNull(people.email),
				ne(people.id, person.id)
			)
		)
		.orderBy(sql`(${people.shiftId} <=> ${person.shiftId}) DESC`, people.id) as Promise<
		{ id: number; name: string; email: string }[]
	>;
}

function contentFor(body: Body, a: Parameters<NoticeFor>[0]): MailContent {
	if ('notice' in body) return renderNotice(a, body.notice(a));
	return { subject: body.subject, text: body.text, html: body.html };
}

/**
 * Writes a message into the outbox inside the caller's transaction (INSERT IGNORE on the dedupe
 * key). Recipient resolution is described at the top of this file.
 */
export async function queueMail(tx: Tx, input: QueueMailInput): Promise<QueueMailResult> {
	const now = input.now ?? new Date();
	const base = {
		kind: input.kind,
		createdAt: now,
		sendAfter: input.sendAfter ?? now,
		aboutPersonId: input.aboutPersonId ?? input.toPersonId ?? null
	};
	const put = async (
		dedupeKey: string,
		toAddress: string,
		toPersonId: number | null,
		c: MailContent,
		extra: Partial<typeof mailOutbox.$inferInsert> = {}
	) =>
		affected(
			await tx
				.insert(mailOutbox)
				.ignore()
				.values({
					...base,
					dedupeKey,
					toAddress,
					toPersonId,
					subject: c.subject.slice(0, 300),
					textBody: c.text,
					htmlBody: c.html,
					...extra
				})
		);

	if (input.toAddress != null) {
		const c = contentFor(input, { kind: 'self', name: input.toAddress });
		return { queued: await put(input.dedupeKey, input.toAddress, null, c), route: 'direct' };
	}

	const [p] = await tx
		.select({
			id: people.id,
			name: people.displayName,
			email: people.email,
			badge: people.badgeNo,
			active: people.active,
			lineId: people.lineId,
			shiftId: people.shiftId,
			line: lines.code
		})
		.from(people)
		.leftJoin(lines, eq(lines.id, people.lineId))
		.where(eq(people.id, input.toPersonId));
	if (!p || !p.active) return { queued: 0, route: 'inactive', reason: 'not an active person' };

	if (p.email) {
		const c = contentFor(input, { kind: 'self', name: p.name });
		return { queued: await put(input.dedupeKey, p.email, p.id, c), route: 'direct' };
	}

	const leads = await leadsFor(tx, p);
	const about = { name: p.name, badge: p.badge, line: p.line };
	if (!leads.length) {
		const reason = `${p.name} has no e-mail address and no line lead with one covers their line.`;
		const c = contentFor(input, { kind: 'self', name: p.name });
		const queued = await put(input.dedupeKey, '', null, c, {
			attempts: MAX_ATTEMPTS,
			lastError: reason
		});
		return { queued, route: 'undeliverable', reason };
	}

	if (URGENT_KINDS.includes(input.kind)) {
		let queued = 0;
		for (const lead of leads) {
			const c = contentFor(input, { kind: 'lead', name: lead.name, about });
			queued += await put(`${input.dedupeKey}:via:${lead.id}`, lead.email, lead.id, c);
		}
		return { queued, route: 'lead' };
	}

	const lead = leads[0];
	const zone = await siteZoneOf(lead.id, tx);
	const c = contentFor(input, { kind: 'lead', name: lead.name, about });
	const queued = await put(input.dedupeKey, lead.email, lead.id, c, {
		claimedBy: DIGEST_HOLD,
		claimedUntil: new Date(nextDigestAt(now, zone).getTime() + HOLD_GRACE_MS)
	});
	return { queued, route: 'digest' };
}
