// Outbox sender throughput: how fast sendPendingMail (mail/send.ts) delivers a backlog of due
// messages over real SMTP to the local catcher, beside a floor measured in the same run with the
// same messages and no database (the worker's own transport, sending in a loop), and nodemailer's
// defaults for scale (Nagle's algorithm on: one reused connection, and a connection per message).
//
// Data: a scratch database `padbridge_scratch_mail` on the dev MariaDB (migrations applied) with
// BENCH_MESSAGES (500) due messages of about 3 KB each, sent BENCH_RUNS (3) times; dropped at the
// end. The SMTP catcher of `npm start` is used, or started for the run and stopped after.
// Usage: npm run bench:mail
import { createConnection } from 'node:net';
import nodemailer from 'nodemailer';
import { appEnv, modeConfig } from '../../scripts/lib.js';
import { startFakes } from '../../scripts/services.js';
import { median, openScratch } from '../lib/scratch';

const N = Number(process.env.BENCH_MESSAGES ?? 500);
const RUNS = Number(process.env.BENCH_RUNS ?? 3);
const cfg = modeConfig('dev');

const portOpen = (port: number) =>
	new Promise<boolean>((resolve) => {
		const s = createConnection({ host: '127.0.0.1', port });
		s.once('connect', () => (s.end(), resolve(true)));
		s.once('error', () => resolve(false));
	});

const text = 'Assignment notice for the bench.\n'.repeat(30);
const html = `<p>${'Assignment notice for the bench. '.repeat(60)}</p>`;
const message = (i: number) => ({
	from: 'Padbridge <padbridge@kbo2.example>',
	to: `bench.${i % 50}@kbo2.example`,
	subject: `Bench notice ${i}`,
	text,
	html
});

const startedFakes = (await portOpen(cfg.smtpPort)) ? null : await startFakes(cfg);
const scratch = await openScratch('padbridge_scratch_mail');
try {
	const rows = Array.from({ length: N }, (_, i) => {
		const m = message(i);
		return [`bench:${i}`, 'assignment', m.to, m.subject, m.text, m.html];
	});
	await scratch.conn.query(
		`INSERT INTO mail_outbox (dedupe_key, kind, to_address, subject, text_body, html_body, created_at, send_after)
		 VALUES ${rows.map(() => '(?, ?, ?, ?, ?, ?, NOW(3), NOW(3) - INTERVAL 1 MINUTE)').join(', ')}`,
		rows.flat()
	);

	const env = appEnv(cfg);
	for (const k of ['SMTP_HOST', 'SMTP_PORT', 'SMTP_SECURE', 'MAIL_FROM']) process.env[k] = env[k];
	process.env.DATABASE_URL = scratch.url;
	const { createTransport, sendPendingMail } = await import('../../src/lib/server/mail/send');
	const { pool } = await import('../../src/lib/server/db/index');

	const worker: number[] = [];
	for (let r = 0; r < RUNS; r++) {
		await scratch.conn.query(
			'UPDATE mail_outbox SET sent_at = NULL, attempts = 0, claimed_by = NULL, claimed_until = NULL'
		);
		const s = performance.now();
		let sent = 0;
		for (;;) {
			const res = await sendPendingMail();
			sent += res.sent;
			if (res.failed + res.gaveUp) throw new Error(`worker: ${JSON.stringify(res)}`);
			if (res.sent + res.released === 0) break;
		}
		worker.push((performance.now() - s) / 1000);
		if (sent !== N) throw new Error(`worker sent ${sent} of ${N}`);
		console.error(`worker run ${r + 1}: ${worker[r].toFixed(2)} s`);
	}
	await pool.end();

	// The floors send the same messages with no database: the worker's own transport, then
	// nodemailer as it comes (Nagle on) over one connection and over a connection per message.
	// Those two are slow, so they send a fifth of the messages; the table compares messages/s.
	const smtp = { host: '127.0.0.1', port: cfg.smtpPort, secure: false };
	async function floor(make: () => ReturnType<typeof nodemailer.createTransport>, count: number) {
		const times: number[] = [];
		for (let r = 0; r < RUNS; r++) {
			const t = make();
			const s = performance.now();
			for (let i = 0; i < count; i++) await t.sendMail(message(i));
			times.push((performance.now() - s) / 1000);
			t.close();
		}
		return { seconds: median(times), count };
	}
	const same = await floor(createTransport, N);
	const small = Math.max(1, Math.round(N / 5));
	const reused = await floor(
		() => nodemailer.createTransport({ ...smtp, pool: true, maxConnections: 1 }),
		small
	);
	const perMessage = await floor(() => nodemailer.createTransport(smtp), small);
	const w = { seconds: median(worker), count: N };
	const rate = (x: { seconds: number; count: number }) => x.count / x.seconds;

	console.log(
		`\nOutbox sender: due messages of about ${((text.length + html.length) / 1024).toFixed(1)} KB to the local SMTP catcher; median of ${RUNS} runs\n`
	);
	console.log('| what | messages | seconds | messages/s | ratio to floor |');
	console.log('| --- | ---: | ---: | ---: | ---: |');
	const line = (what: string, x: { seconds: number; count: number }) =>
		console.log(
			`| ${what} | ${x.count.toLocaleString('en')} | ${x.seconds.toFixed(2)} | ${Math.round(rate(x)).toLocaleString('en')} | ${(rate(x) / rate(same)).toFixed(2)}× |`
		);
	line(
		'sendPendingMail until the outbox is empty (batches of 25, claims and updates in MariaDB)',
		w
	);
	line("floor: the worker's transport (pooled, no-delay socket), no database", same);
	line('nodemailer defaults, one reused connection (Nagle on)', reused);
	line('nodemailer defaults, a new connection per message', perMessage);
} finally {
	await scratch.close();
	if (startedFakes) process.kill(startedFakes);
}
