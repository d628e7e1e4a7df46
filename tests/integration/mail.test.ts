// Mail through the outbox, read back from the SMTP catcher over its HTTP API (what the SMTP server
// really received, never a mock): reminders once, lead cover for people without e-mail, retry with
// backoff while the server is down, parallel senders (also in a second Node process), escaping.
// The test app runs with PADBRIDGE_JOBS=off (scripts/test.js), so only these tests drive the jobs;
// assertions still look only at this file's own recipients and rows.
import { spawn } from 'node:child_process';
import { randomBytes } from 'node:crypto';
import { createServer, type AddressInfo } from 'node:net';
import path from 'node:path';
import type { ResultSetHeader } from 'mysql2/promise';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { config } from '../../src/lib/server/config';
import { db, pool } from '../../src/lib/server/db';
import { evaluateAndIssue } from '../../src/lib/server/certificates/issue';
import { runCertificateLifecycle } from '../../src/lib/server/certificates/lifecycle';
import { queueLeadDigests } from '../../src/lib/server/mail/digest';
import {
	queueAssignmentMail,
	queueSupervisedRunMail,
	queueSuspensionMail
} from '../../src/lib/server/mail/events';
import { MAX_ATTEMPTS, queueMail } from '../../src/lib/server/mail/outbox';
import { queueExpiryReminders } from '../../src/lib/server/mail/reminders';
import { createTransport, messageIdFor, sendPendingMail } from '../../src/lib/server/mail/send';
import {
	appDb,
	closeDbHelpers,
	createTestPerson,
	queryRows,
	retireTestPeople,
	TEST_PASSWORD,
	type TestPerson
} from '../helpers/db';
import { caughtFor, smtpSwitch } from '../helpers/mail-catcher';
import {
	acknowledge,
	certificateRows,
	makeInstructionRows,
	makeProcess,
	makeRule
} from '../helpers/training-fixtures';
import { signInWithBadge, signInWithPassword } from '../helpers/http-session';
import {
	createTestPerson as createWorkflowPerson,
	makeInstruction
} from '../helpers/instruction-fixtures';

const DAY = 86_400_000;
let quality: TestPerson;

beforeAll(async () => {
	quality = await createTestPerson({ roles: ['quality'] });
});
afterAll(async () => {
	await smtpSwitch('up');
	await retireTestPeople();
	await closeDbHelpers();
	await pool.end();
});

interface OutboxRow {
	id: number;
	dedupe_key: string;
	kind: string;
	to_address: string;
	to_person_id: number | null;
	about_person_id: number | null;
	subject: string;
	text_body: string;
	html_body: string;
	send_after: Date;
	attempts: number;
	last_error: string | null;
	claimed_by: string | null;
	sent_at: Date | null;
	message_id: string | null;
}

const outbox = (where: string, params: unknown[]) =>
	queryRows<OutboxRow>(appDb(), `SELECT * FROM mail_outbox WHERE ${where} ORDER BY id`, params);

/** Sends until nothing due at `now` is left. */
async function drain(now: Date) {
	for (let i = 0; i < 50; i++) {
		const r = await sendPendingMail(now);
		if (r.sent + r.failed + r.gaveUp + r.released === 0) return;
	}
	throw new Error('the outbox did not drain');
}

async function testLine(): Promise<number> {
	const [site] = await queryRows<{ id: number }>(
		appDb(),
		"SELECT id FROM sites WHERE code = 'KBO-2'"
	);
	const code = `TL${randomBytes(3).toString('hex').toUpperCase()}`;
	const [res] = await appDb().query<ResultSetHeader>(
		'INSERT INTO `lines` (site_id, code, name, active) VALUES (?, ?, ?, 1)',
		[site.id, code, `Test line ${code}`]
	);
	return res.insertId;
}

async function putOnLine(personId: number, lineId: number) {
	await appDb().query('UPDATE people SET line_id = ? WHERE id = ?', [lineId, personId]);
}

/**
 * Issues `holder` a certificate (2 months' validity, reminders [30, 7]) and returns the instant at
 * which exactly 30 days of validity are left.
 */
async function certificateFor(holderId: number) {
	const proc = await makeProcess();
	const ins = await makeInstructionRows(quality.id, proc.id, [
		{ letter: 'A', effectiveFrom: new Date(Date.now() - 60 * DAY) }
	]);
	await makeRule({
		processId: proc.id,
		createdBy: quality.id,
		instructionIds: [ins.id],
		validityMonths: 2,
		reminderDays: [30, 7]
	});
	await acknowledge(holderId, ins.revisionIds[0], new Date(Date.now() - DAY));
	const r = await evaluateAndIssue(holderId, proc.id, { now: new Date(Date.now() - 1000) });
	expect(r.certificateId).not.toBeNull();
	const [cert] = await certificateRows(holderId, proc.id);
	return {
		certificateId: r.certificateId!,
		expiresAt: cert.expires_at,
		at30: new Date(cert.expires_at.getTime() - 30 * DAY),
		proc
	};
}

describe('expiry reminders', () => {
	it('a certificate expiring in exactly 30 days: one message, right recipient and link', async () => {
		const holder = await createTestPerson({ roles: ['operator'] });
		const c = await certificateFor(holder.id);
		const key = `expiring_30:certificate:${c.certificateId}`;

		// One millisecond more than 30 days left: not yet.
		await queueExpiryReminders(new Date(c.at30.getTime() - 1));
		expect(await outbox('dedupe_key = ?', [key])).toHaveLength(0);

		await queueExpiryReminders(c.at30);
		await queueExpiryReminders(c.at30);
		await drain(c.at30);
		await drain(c.at30);

		const rows = await outbox('dedupe_key = ?', [key]);
		expect(rows).toHaveLength(1);
		expect(rows[0]).toMatchObject({
			kind: 'expiring_30',
			to_address: holder.email,
			to_person_id: holder.id,
			about_person_id: holder.id,
			attempts: 0
		});
		expect(rows[0].sent_at).not.toBeNull();
		expect(rows[0].message_id).toBe(messageIdFor(rows[0].id, key));

		const mail = await caughtFor(holder.email!);
		expect(mail).toHaveLength(1);
		expect(mail[0].messageId).toBe(rows[0].message_id);
		expect(mail[0].subject).toMatch(/certificate expires in 30 days/);
		expect(config.publicUrl).toBe(process.env.TEST_APP_URL);
		expect(mail[0].text).toContain(`See what to do next: ${config.publicUrl}/`);
		expect(mail[0].html).toContain(`href="${config.publicUrl}/"`);
		expect(mail[0].text).toContain(c.proc.code);

		// The 7-day reminder is a second, separate message, also once.
		const at7 = new Date(c.expiresAt.getTime() - 7 * DAY);
		await queueExpiryReminders(at7);
		await queueExpiryReminders(at7);
		await drain(at7);
		const after = await caughtFor(holder.email!);
		expect(after).toHaveLength(2);
		expect(after.filter((m) => /expires in 7 days/.test(m.subject))).toHaveLength(1);
	});

	it('escapes a name like <script> in the HTML part and sends both parts', async () => {
		const name = '<script>alert("x")</script> Đặng & Co';
		const holder = await createTestPerson({ roles: ['operator'], displayName: name });
		const c = await certificateFor(holder.id);
		await queueExpiryReminders(c.at30);
		await drain(c.at30);
		const [mail] = await caughtFor(holder.email!);
		expect(mail.text).toContain(`Hello ${name},`);
		expect(mail.html).toContain(
			'Hello &lt;script&gt;alert(&quot;x&quot;)&lt;/script&gt; Đặng &amp; Co,'
		);
		expect(mail.html).not.toContain('<script');
		expect(mail.html).toMatch(/^<!doctype html>/);
	});
});

describe('people without e-mail are covered through their line lead', () => {
	it('a reminder for an operator without e-mail reaches the lead in the daily digest, once', async () => {
		const line = await testLine();
		const lead = await createTestPerson({ roles: ['lead'] });
		const op = await createTestPerson({
			roles: ['operator'],
			withEmail: false,
			displayName: `Phạm Văn Đức ${randomBytes(2).toString('hex')}`
		});
		await putOnLine(lead.id, line);
		await putOnLine(op.id, line);
		const c = await certificateFor(op.id);
		const key = `expiring_30:certificate:${c.certificateId}`;

		await queueExpiryReminders(c.at30);
		const [held] = await outbox('dedupe_key = ?', [key]);
		expect(held).toMatchObject({
			to_address: lead.email,
			to_person_id: lead.id,
			about_person_id: op.id,
			claimed_by: 'digest'
		});
		expect(held.text_body).toContain(`This message is about ${op.displayName}`);
		// Held for the digest: the sender leaves it alone.
		await drain(c.at30);
		expect(await caughtFor(lead.email!)).toHaveLength(0);

		// 07:00 plant time on that day (at30 is 00:00 plant time): the digest goes out.
		const morning = new Date(c.at30.getTime() + 7 * 3_600_000);
		await queueLeadDigests(morning);
		await queueLeadDigests(new Date(morning.getTime() + 3_600_000));
		await drain(morning);
		const mail = await caughtFor(lead.email!);
		expect(mail).toHaveLength(1);
		expect(mail[0].subject).toMatch(/^Daily crew digest/);
		expect(mail[0].text).toContain(op.displayName);
		expect(mail[0].text).toMatch(/New since the last digest:\n- .*certificate expires in 30 days/);
		const [folded] = await outbox('dedupe_key = ?', [key]);
		expect(folded.sent_at).not.toBeNull();
		expect(folded.message_id).toBe(mail[0].messageId);
		const digests = await outbox('kind = ? AND to_person_id = ?', ['lead_digest', lead.id]);
		expect(digests).toHaveLength(1);

		// A suspension is urgent: it goes to the lead at once, saying whom it is about.
		await db.transaction((tx) =>
			queueSuspensionMail(tx, {
				certificateId: c.certificateId,
				reason: 'Indentation count not read on two shifts',
				at: morning
			})
		);
		await drain(morning);
		const suspended = (await caughtFor(lead.email!)).filter((m) => /suspended/.test(m.subject));
		expect(suspended).toHaveLength(1);
		expect(suspended[0].text).toContain(`This message is about ${op.displayName}`);
		expect(suspended[0].text).toContain('Caution: Do not run');

		// What the operator sees under Messages: both, sent to their lead.
		const client = await signInWithBadge(op.badge!, op.pin);
		const page = await (await client.get('/messages')).text();
		expect(page).toContain('expires in 30 days');
		expect(page).toContain(`To your line lead ${lead.displayName}`);
	});

	it('nobody to send to: the row is kept as not delivered, with the reason', async () => {
		const line = await testLine();
		const op = await createTestPerson({ roles: ['operator'], withEmail: false });
		await putOnLine(op.id, line);
		const key = `test:no-lead:${op.id}`;
		const r = await db.transaction((tx) =>
			queueMail(tx, {
				kind: 'assignment',
				dedupeKey: key,
				toPersonId: op.id,
				subject: 'Test',
				text: 'Test',
				html: '<p>Test</p>'
			})
		);
		expect(r.route).toBe('undeliverable');
		const [row] = await outbox('dedupe_key = ?', [key]);
		expect(row.attempts).toBe(MAX_ATTEMPTS);
		expect(row.last_error).toMatch(/no e-mail address and no line lead/);
	});
});

describe('the sender', () => {
	it('retries with backoff while the SMTP server is down, then delivers once', async () => {
		const t0 = new Date();
		await drain(t0);
		const address = `retry-${randomBytes(4).toString('hex')}@test.kbo2.example`;
		const key = `test:retry:${address}`;
		await db.transaction((tx) =>
			queueMail(tx, {
				kind: 'assignment',
				dedupeKey: key,
				toAddress: address,
				subject: 'Retry test',
				text: 'Retry test',
				html: '<p>Retry test</p>',
				now: t0
			})
		);
		await smtpSwitch('down');
		try {
			const r = await sendPendingMail(t0);
			expect(r.failed).toBe(1);
		} finally {
			await smtpSwitch('up');
		}
		let [row] = await outbox('dedupe_key = ?', [key]);
		expect(row.attempts).toBe(1);
		expect(row.sent_at).toBeNull();
		expect(row.last_error).toBeTruthy();
		expect(row.send_after.getTime()).toBe(t0.getTime() + 60_000);
		expect(row.claimed_by).toBeNull();

		// Up again, but not due yet: nothing goes.
		await drain(t0);
		expect(await caughtFor(address)).toHaveLength(0);
		const later = new Date(t0.getTime() + 61_000);
		await drain(later);
		await drain(later);
		[row] = await outbox('dedupe_key = ?', [key]);
		expect(row.sent_at).not.toBeNull();
		expect(row.attempts).toBe(1);
		expect(await caughtFor(address)).toHaveLength(1);
	});

	it('fails at once, naming the cause, when nothing listens on the mail port', async () => {
		// The worker opens its own sockets (Nagle off, see send.ts): a refused connection must
		// still come back as nodemailer's error, not hang the batch.
		const closed = await new Promise<number>((resolve) => {
			const srv = createServer().listen(0, '127.0.0.1', () => {
				const { port } = srv.address() as AddressInfo;
				srv.close(() => resolve(port));
			});
		});
		const port = config.smtp.port;
		config.smtp.port = closed;
		const transport = createTransport();
		try {
			const started = Date.now();
			await expect(
				transport.sendMail({
					from: config.mailFrom,
					to: 'x@test.kbo2.example',
					subject: 'x',
					text: 'x'
				})
			).rejects.toMatchObject({ code: 'ECONNREFUSED' });
			expect(Date.now() - started).toBeLessThan(2_000);
		} finally {
			transport.close();
			config.smtp.port = port;
		}
	});

	it('two senders in this process and one in another Node process send each row once', async () => {
		const t0 = new Date();
		const tag = randomBytes(4).toString('hex');
		const addresses = Array.from({ length: 60 }, (_, i) => `par-${tag}-${i}@test.kbo2.example`);
		await db.transaction(async (tx) => {
			for (const a of addresses) {
				await queueMail(tx, {
					kind: 'assignment',
					dedupeKey: `test:parallel:${a}`,
					toAddress: a,
					subject: `Parallel ${a}`,
					text: 'Parallel test',
					html: '<p>Parallel test</p>',
					now: t0
				});
			}
		});
		const child = new Promise<{ sent: number }>((resolve, reject) => {
			const p = spawn(
				process.execPath,
				[
					path.resolve('node_modules/tsx/dist/cli.mjs'),
					'tests/helpers/send-mail-once.ts',
					t0.toISOString()
				],
				{ env: process.env, stdio: ['ignore', 'pipe', 'inherit'] }
			);
			let out = '';
			p.stdout.on('data', (d) => (out += d));
			p.on('error', reject);
			p.on('exit', (code) =>
				code === 0 ? resolve(JSON.parse(out)) : reject(new Error(`sender exited ${code}`))
			);
		});
		const loop = async () => {
			let sent = 0;
			for (;;) {
				const r = await sendPendingMail(t0);
				sent += r.sent;
				if (r.sent + r.failed + r.gaveUp + r.released === 0) return sent;
			}
		};
		const [a, b, c] = await Promise.all([loop(), loop(), child]);
		expect(a + b + c.sent).toBeGreaterThanOrEqual(60);
		const rows = await outbox('dedupe_key LIKE ?', [`test:parallel:par-${tag}-%`]);
		expect(rows).toHaveLength(60);
		expect(rows.every((r) => r.sent_at != null && r.attempts === 0)).toBe(true);
		for (const address of addresses) expect(await caughtFor(address)).toHaveLength(1);
	}, 60_000);
});

describe('event mail', () => {
	it('review requested goes to quality approvers, not to the author, with the review link', async () => {
		const author = await createWorkflowPerson(['trainer']);
		const approver = await createWorkflowPerson(['quality']);
		const ins = await makeInstruction(author, approver, [{ source: '# Draft', stop: 'review' }]);
		const revisionId = ins.revisionIds[0];
		const rows = await outbox('dedupe_key LIKE ?', [`review_requested:revision:${revisionId}:%`]);
		expect(rows.some((r) => r.to_person_id === approver.id)).toBe(true);
		expect(rows.some((r) => r.to_person_id === author.id)).toBe(false);
		await drain(new Date());
		const [mail] = await caughtFor(approver.email);
		expect(mail.subject).toBe(`Review requested: ${ins.docNumber} rev A`);
		expect(mail.text).toContain(
			`${config.publicUrl}/instructions/${ins.docNumber}/revisions/A/review`
		);
	});

	it('a retraining-required revision becoming effective mails the holder once', async () => {
		const holder = await createTestPerson({ roles: ['operator'] });
		const proc = await makeProcess();
		const effectiveB = new Date(Date.now() + 3_600_000);
		const x = await makeInstructionRows(quality.id, proc.id, [
			{ letter: 'A', effectiveFrom: new Date(Date.now() - 90 * DAY) },
			{ letter: 'B', effectiveFrom: effectiveB, classification: 'retraining' }
		]);
		await makeRule({ processId: proc.id, createdBy: quality.id, instructionIds: [x.id] });
		await acknowledge(holder.id, x.revisionIds[0]);
		const cert = await evaluateAndIssue(holder.id, proc.id);
		await runCertificateLifecycle(effectiveB);
		await runCertificateLifecycle(effectiveB);
		const key = `retraining_needed:certificate:${cert.certificateId}:revision:${x.revisionIds[1]}`;
		const rows = await outbox('dedupe_key = ?', [key]);
		expect(rows).toHaveLength(1);
		expect(rows[0].to_address).toBe(holder.email);
		expect(rows[0].text_body).toContain(
			`${config.publicUrl}/instructions/${x.docNumber}/acknowledge`
		);
	});

	it('assignment and supervised-run helpers queue their messages once', async () => {
		const op = await createTestPerson({ roles: ['operator'] });
		const sup = await createTestPerson({ roles: ['operator'] });
		const lead = await createTestPerson({ roles: ['lead'] });
		const proc = await makeProcess();
		const [a] = await appDb().query<ResultSetHeader>(
			`INSERT INTO assignments (person_id, process_id, scope, due_on, assigned_by, assigned_at)
			 VALUES (?, ?, 'person', '2031-05-01', ?, ?)`,
			[op.id, proc.id, lead.id, new Date()]
		);
		const [station] = await queryRows<{ id: number }>(appDb(), 'SELECT id FROM stations LIMIT 1');
		const start = new Date();
		const [run] = await appDb().query<ResultSetHeader>(
			`INSERT INTO supervised_runs (person_id, station_id, supervisor_id, granted_by, reason,
			   starts_at, ends_at, created_at) VALUES (?, ?, ?, ?, 'Cover for a sick colleague', ?, ?, ?)`,
			[op.id, station.id, sup.id, lead.id, start, new Date(start.getTime() + 4 * 3_600_000), start]
		);
		for (let i = 0; i < 2; i++) {
			await db.transaction(async (tx) => {
				await queueAssignmentMail(tx, { assignmentId: a.insertId });
				await queueSupervisedRunMail(tx, { supervisedRunId: run.insertId });
			});
		}
		const rows = await outbox('to_person_id IN (?, ?)', [op.id, sup.id]);
		expect(rows.map((r) => [r.kind, r.to_person_id]).sort()).toEqual(
			[
				['assignment', op.id],
				['supervised_run', op.id],
				['supervised_run', sup.id]
			].sort()
		);
		expect(rows.find((r) => r.kind === 'assignment')!.subject).toBe(
			`Training assigned: ${proc.code} (due 2031-05-01)`
		);
	});
});

describe('My messages', () => {
	it('lists what was sent to the person, and answers 404 for anyone else’s message', async () => {
		const me = await createTestPerson({ roles: ['operator'] });
		const other = await createTestPerson({ roles: ['operator'] });
		const queue = (p: TestPerson, subject: string) =>
			db.transaction((tx) =>
				queueMail(tx, {
					kind: 'assignment',
					dedupeKey: `test:messages:${p.id}`,
					toPersonId: p.id,
					subject,
					text: `Body for ${subject}`,
					html: `<p>Body for ${subject}</p>`
				})
			);
		await queue(me, 'Mine: WI-COG-004 rev C');
		await queue(other, 'Not yours: private subject');
		const [mine] = await outbox('dedupe_key = ?', [`test:messages:${me.id}`]);
		const [theirs] = await outbox('dedupe_key = ?', [`test:messages:${other.id}`]);

		const client = await signInWithPassword(me.email!, TEST_PASSWORD);
		const list = await client.get('/messages');
		expect(list.status).toBe(200);
		const html = await list.text();
		expect(html).toContain('Mine: WI-COG-004 rev C');
		expect(html).not.toContain('Not yours');

		const detail = await client.get(`/messages/${mine.id}`);
		expect(detail.status).toBe(200);
		expect(await detail.text()).toContain('Body for Mine: WI-COG-004 rev C');

		const probe = await client.get(`/messages/${theirs.id}`);
		expect(probe.status).toBe(404);
		expect(await probe.text()).not.toContain('private subject');
	});
});
