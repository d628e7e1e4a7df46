// The admins' view of the mail outbox (/admin/mail): messages given up are listed with the
// reason, and one a mail server refused can be queued again, once, with a reason in the audit
// trail; the worker then delivers it to the SMTP catcher. One with nobody to send to cannot.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { db, pool } from '../../src/lib/server/db';
import { MAX_ATTEMPTS, queueMail } from '../../src/lib/server/mail/outbox';
import { sendPendingMail } from '../../src/lib/server/mail/send';
import {
	appDb,
	closeDbHelpers,
	createTestPerson,
	queryRows,
	retireTestPeople,
	type TestPerson
} from '../helpers/db';
import { caughtFor } from '../helpers/mail-catcher';
import { signInAsDemo, type HttpClient } from '../helpers/http-session';

let admin: HttpClient;
let recipient: TestPerson;
let refusedId = 0;
let nobodyId = 0;
const tag = Date.now().toString(36);

interface Row {
	attempts: number;
	last_error: string | null;
	sent_at: Date | null;
	send_after: Date;
}
const rowOf = async (id: number) =>
	(
		await queryRows<Row & import('mysql2').RowDataPacket>(
			appDb(),
			'SELECT attempts, last_error, sent_at, send_after FROM mail_outbox WHERE id = ?',
			[id]
		)
	)[0];

beforeAll(async () => {
	admin = await signInAsDemo('admin');
	recipient = await createTestPerson({ roles: ['trainer'] });
	const nobody = await createTestPerson({ roles: ['operator'], withEmail: false });
	await db.transaction(async (tx) => {
		await queueMail(tx, {
			kind: 'assignment',
			dedupeKey: `outbox-admin:refused:${tag}`,
			toPersonId: recipient.id,
			subject: `Refused notice ${tag}`,
			text: 'Refused notice',
			html: '<p>Refused notice</p>'
		});
		await queueMail(tx, {
			kind: 'assignment',
			dedupeKey: `outbox-admin:nobody:${tag}`,
			toPersonId: nobody.id,
			subject: `Nobody notice ${tag}`,
			text: 'Nobody notice',
			html: '<p>Nobody notice</p>'
		});
	});
	const ids = await queryRows<{ id: number; dedupe_key: string } & import('mysql2').RowDataPacket>(
		appDb(),
		'SELECT id, dedupe_key FROM mail_outbox WHERE dedupe_key LIKE ?',
		[`outbox-admin:%:${tag}`]
	);
	refusedId = ids.find((r) => r.dedupe_key.includes(':refused:'))!.id;
	nobodyId = ids.find((r) => r.dedupe_key.includes(':nobody:'))!.id;
	// What the worker leaves after a mail server refused the message for good.
	await appDb().query('UPDATE mail_outbox SET attempts = ?, last_error = ? WHERE id = ?', [
		MAX_ATTEMPTS,
		'550 5.2.2 mailbox full',
		refusedId
	]);
});

afterAll(async () => {
	await retireTestPeople();
	await closeDbHelpers();
	await pool.end();
});

async function auditFor(id: number) {
	return queryRows<{ reason: string; actor_label: string } & import('mysql2').RowDataPacket>(
		appDb(),
		"SELECT reason, actor_label FROM audit_events WHERE action = 'mail.resend' AND entity_id = ?",
		[String(id)]
	);
}

describe('the mail outbox page', () => {
	it('lists both messages given up, with what went wrong', async () => {
		const res = await admin.get('/admin/mail');
		const html = await res.text();
		expect(res.status).toBe(200);
		expect(html).toContain(`Refused notice ${tag}`);
		expect(html).toContain(`Nobody notice ${tag}`);
		expect(html).toContain('550 5.2.2 mailbox full');
		expect(html).toContain(`Refused · ${MAX_ATTEMPTS} tries`);
		expect(html).toMatch(/no e-mail address and no line lead/);
		expect(html).toContain('Refused by the mail server');
	});

	it('asks for a reason on the field and leaves the message as it was', async () => {
		const res = await admin.postForm('/admin/mail?/resend', { id: refusedId, reason: ' ' });
		expect(res.status).toBe(400);
		expect(await res.text()).toContain('Say what was fixed');
		expect((await rowOf(refusedId)).attempts).toBe(MAX_ATTEMPTS);
		expect(await auditFor(refusedId)).toHaveLength(0);
	});

	it('refuses to send again a message that had nobody to go to, saying what to do', async () => {
		const res = await admin.postForm('/admin/mail?/resend', {
			id: nobodyId,
			reason: 'trying anyway'
		});
		expect(res.status).toBe(409);
		expect(await res.text()).toContain('Give the person an e-mail address');
		expect((await rowOf(nobodyId)).attempts).toBe(MAX_ATTEMPTS);
		expect(await auditFor(nobodyId)).toHaveLength(0);
	});

	it('queues a refused message again once, audited, and the worker delivers it', async () => {
		const res = await admin.postForm('/admin/mail?/resend', {
			id: refusedId,
			reason: 'Mailbox emptied by IT'
		});
		expect(res.status).toBe(303);
		expect(res.headers.get('location')).toBe(`/admin/mail?resent=${refusedId}`);
		const queued = await rowOf(refusedId);
		expect(queued.attempts).toBe(0);
		expect(queued.sent_at).toBeNull();
		expect(queued.last_error).toMatch(/^sent again by .+; before: 550 5\.2\.2 mailbox full$/);
		const audit = await auditFor(refusedId);
		expect(audit).toHaveLength(1);
		expect(audit[0].reason).toBe('Mailbox emptied by IT');

		// Due now, behind whatever other files have left due (the worker sends the oldest first).
		expect(queued.send_after.getTime()).toBeLessThanOrEqual(Date.now());
		// How many others are due is up to the files running beside this one, so this row is moved
		// to the head of the queue; another file's sender may still claim it first, hence the loop.
		await appDb().query("UPDATE mail_outbox SET send_after = '1971-01-01' WHERE id = ?", [
			refusedId
		]);
		const deadline = Date.now() + 20_000;
		while (!(await rowOf(refusedId)).sent_at && Date.now() < deadline) {
			const r = await sendPendingMail();
			if (!r.sent) await new Promise((done) => setTimeout(done, 250));
		}
		expect((await rowOf(refusedId)).sent_at).not.toBeNull();
		const caught = await caughtFor(recipient.email!);
		expect(caught.filter((m) => m.subject === `Refused notice ${tag}`)).toHaveLength(1);

		const again = await admin.postForm('/admin/mail?/resend', {
			id: refusedId,
			reason: 'once more'
		});
		expect(again.status).toBe(409);
		expect(await again.text()).toContain('sent already');
		expect(await auditFor(refusedId)).toHaveLength(1);
	});

	it('refuses an id that is not plain digits instead of reading its first digits', async () => {
		// Read loosely, "<id>abc" would be the id of the message sent above (a 409, sent already).
		const res = await admin.postForm('/admin/mail?/resend', {
			id: `${refusedId}abc`,
			reason: 'loose id'
		});
		expect(res.status).toBe(400);
		expect(await res.text()).toContain('Enter the number in plain digits');
		expect(await auditFor(refusedId)).toHaveLength(1);
	});

	it('answers an id that is no message with a message on the page, not an error', async () => {
		const res = await admin.postForm('/admin/mail?/resend', {
			id: '99999999999',
			reason: 'no such row'
		});
		expect(res.status).toBe(404);
		expect(await res.text()).toContain('There is no such message.');
	});
});
