// The outbox worker: claims due rows with a conditional UPDATE (a lease in claimed_by /
// claimed_until), so two app instances, or two calls in one process, never hold the same row; sends
// each over SMTP with nodemailer; records the result.
//
// Delivery is at-least-once at one edge, and this is the honest limit of SMTP: if the process dies
// after the server accepted a message but before sent_at is written, the claim runs out and the row
// is sent again. To make that recognisable the row carries a stable Message-ID (from its id and
// dedupe key), written when it is claimed, before any SMTP traffic: the second copy has the same
// Message-ID (many mail stores drop such duplicates), and the claim step records in last_error that
// an earlier send was interrupted. sent_at is written straight after the server's reply to keep
// that window to a few milliseconds.
import { createHash, randomUUID } from 'node:crypto';
import nodemailer from 'nodemailer';
import { connect, type Socket } from 'node:net';
import type SMTPPool from 'nodemailer/lib/smtp-pool';
import { sql } from 'drizzle-orm';
import { db } from '../db';
import { mailOutbox } from '../db/schema';
import { config } from '../config';
import { INSTANCE_ID } from '../jobs/lease';
import { MAX_ATTEMPTS } from './outbox';

/** How long a claim holds; a batch stops early rather than outlive it. */
const CLAIM_MS = 5 * 60_000;
const BATCH = 25;
/** claimed_until of rows folded into a digest (they are settled with the digest row). */
export const FOLDED_UNTIL = new Date('9999-12-31T00:00:00Z');

export const backoffMinutes = (attempts: number) => Math.min(60, 2 ** Math.max(0, attempts - 1));

const affected = (res: unknown) => (res as [{ affectedRows: number }])[0].affectedRows;

function mailDomain(): string {
	const m = /@([^>\s]+)>?\s*$/.exec(config.mailFrom);
	if (m) return m[1];
	try {
		return new URL(config.publicUrl).hostname;
	} catch {
		return 'padbridge.invalid';
	}
}

/** The Message-ID a row is always sent with. Pure, so a resend is recognisable. */
export function messageIdFor(id: number, dedupeKey: string): string {
	const h = createHash('sha256').update(dedupeKey).digest('hex').slice(0, 16);
	return `<padbridge.${id}.${h}@${mailDomain()}>`;
}

const CONNECT_TIMEOUT_MS = 5_000;

/**
 * A TCP connection to the mail server with Nagle's algorithm off. nodemailer writes each SMTP
 * command and the message's closing dot as small separate writes; with Nagle on, each waits for the
 * server's delayed ACK (about 40 ms on Linux), which capped a batch at some 20 messages a second
 * on one connection (bench/mail). TLS, on port 465 or by STARTTLS, is still set up by nodemailer
 * over this socket.
 */
function noDelaySocket(
	options: { host?: string; port?: number },
	callback: (err: Error | null, socketOptions?: { connection: Socket }) => void
) {
	let settled = false;
	const done = (err: Error | null, socket?: Socket) => {
		if (settled) return;
		settled = true;
		clearTimeout(timer);
		if (err) {
			socket?.destroy();
			callback(err);
		} else callback(null, { connection: socket! });
	};
	const socket = connect({ host: options.host, port: options.port ?? 587, noDelay: true });
	const timer = setTimeout(
		() => done(Object.assign(new Error('Connection timeout'), { code: 'ETIMEDOUT' }), socket),
		CONNECT_TIMEOUT_MS
	);
	socket.once('connect', () => done(null, socket));
	socket.once('error', (err) => done(err, socket));
}

/** One pooled connection per batch: the batch's messages go over it one after another. */
export function createTransport() {
	const options: SMTPPool.Options = {
		pool: true,
		maxConnections: 1,
		host: config.smtp.host,
		port: config.smtp.port,
		secure: config.smtp.secure,
		auth: config.smtp.user ? { user: config.smtp.user, pass: config.smtp.password } : undefined,
		connectionTimeout: CONNECT_TIMEOUT_MS,
		greetingTimeout: 5_000,
		socketTimeout: 15_000,
		getSocket: noDelaySocket
	};
	return nodemailer.createTransport(options);
}

type SmtpError = Error & { code?: string; command?: string; responseCode?: number };

/** Rejected for this message (5xx to the envelope or data): retrying will not help. */
const isPermanent = (e: SmtpError) =>
	(e.responseCode ?? 0) >= 500 && /^(MAIL FROM|RCPT TO|DATA)/i.test(e.command ?? '');
/** A 4xx for this message only (e.g. a full mailbox): retry it, carry on with the others. */
const isMessageLevel = (e: SmtpError) =>
	(e.responseCode ?? 0) >= 400 && /^(MAIL FROM|RCPT TO|DATA)/i.test(e.command ?? '');

export interface SendResult {
	sent: number;
	failed: number;
	gaveUp: number;
	/** Claimed but handed back untried (the server was unreachable, or the batch ran long). */
	released: number;
}

/** Sends the due, unsent rows this call can claim. Safe to run on every instance at once. */
export async function sendPendingMail(now: Date = new Date()): Promise<SendResult> {
	const token = `${INSTANCE_ID}:${randomUUID().slice(0, 8)}`.slice(0, 100);
	const until = new Date(now.getTime() + CLAIM_MS);
	const domain = mailDomain();
	// Assignments run left to right, so last_error sees the old claim before it is replaced. A row
	// whose earlier claim ran out (not a digest hold) was interrupted mid-send.
	await db.execute(sql`
		UPDATE mail_outbox SET
			last_error = CASE WHEN claimed_by IS NOT NULL AND claimed_by <> 'digest'
				THEN CONCAT('an earlier send (', claimed_by, ') was interrupted; sent again with the same Message-ID')
				ELSE last_error END,
			message_id = CONCAT('<padbridge.', id, '.', LEFT(SHA2(dedupe_key, 256), 16), '@', ${domain}, '>'),
			claimed_by = ${token},
			claimed_until = ${until}
		WHERE sent_at IS NULL AND attempts < ${MAX_ATTEMPTS} AND send_after <= ${now}
			AND (claimed_until IS NULL OR claimed_until <= ${now})
		ORDER BY send_after, id
		LIMIT ${BATCH}`);
	const rows = await db
		.select()
		.from(mailOutbox)
		.where(sql`${mailOutbox.claimedBy} = ${token}`)
		.orderBy(mailOutbox.sendAfter, mailOutbox.id);
	const result: SendResult = { sent: 0, failed: 0, gaveUp: 0, released: 0 };
	if (!rows.length) return result;

	const transport = createTransport();
	const started = Date.now();
	try {
		for (let i = 0; i < rows.length; i++) {
			const row = rows[i];
			if (Date.now() - started > CLAIM_MS / 2) {
				result.released += await release(
					rows.slice(i).map((r) => r.id),
					token
				);
				break;
			}
			const messageId = messageIdFor(row.id, row.dedupeKey);
			try {
				await transport.sendMail({
					from: config.mailFrom,
					to: row.toAddress,
					subject: row.subject,
					text: row.textBody,
					html: row.htmlBody,
					messageId,
					headers: { 'X-Padbridge-Kind': row.kind, 'Auto-Submitted': 'auto-generated' }
				});
			} catch (err) {
				const e = err as SmtpError;
				const attempts = row.attempts + 1;
				const giveUp = isPermanent(e) || attempts >= MAX_ATTEMPTS;
				await db.execute(sql`
					UPDATE mail_outbox SET
						attempts = ${giveUp ? MAX_ATTEMPTS : attempts},
						last_error = ${`${giveUp ? 'gave up: ' : ''}${e.message}`.slice(0, 2000)},
						send_after = ${new Date(now.getTime() + backoffMinutes(attempts) * 60_000)},
						claimed_by = NULL, claimed_until = NULL
					WHERE id = ${row.id} AND claimed_by = ${token}`);
				if (giveUp) {
					result.gaveUp++;
					// Notices folded into a digest that cannot go out are sent on their own instead.
					if (row.kind === 'lead_digest') await unfold(row.id);
				} else result.failed++;
				if (!giveUp && !isMessageLevel(e)) {
					// The server itself is unreachable: leave the rest for the next run, untried.
					result.released += await release(
						rows.slice(i + 1).map((r) => r.id),
						token
					);
					break;
				}
				continue;
			}
			const res = await db.execute(sql`
				UPDATE mail_outbox SET sent_at = ${now}, message_id = ${messageId},
					claimed_by = NULL, claimed_until = NULL
				WHERE id = ${row.id} AND claimed_by = ${token}`);
			if (affected(res) === 1) result.sent++;
			if (row.kind === 'lead_digest') {
				await db.execute(sql`
					UPDATE mail_outbox SET sent_at = ${now}, message_id = ${messageId},
						claimed_by = NULL, claimed_until = NULL
					WHERE claimed_by = ${`digest:${row.id}`} AND sent_at IS NULL`);
			}
		}
	} finally {
		transport.close();
	}
	return result;
}

async function release(ids: number[], token: string): Promise<number> {
	if (!ids.length) return 0;
	const res = await db.execute(sql`
		UPDATE mail_outbox SET claimed_by = NULL, claimed_until = NULL
		WHERE claimed_by = ${token} AND id IN (${sql.join(
			ids.map((id) => sql`${id}`),
			sql`, `
		)})`);
	return affected(res);
}

/** A digest was given up: its folded notices become single messages to their lead. */
async function unfold(digestId: number) {
	await db.execute(sql`
		UPDATE mail_outbox SET claimed_by = NULL, claimed_until = NULL
		WHERE claimed_by = ${`digest:${digestId}`} AND sent_at IS NULL`);
}
