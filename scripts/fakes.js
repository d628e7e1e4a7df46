// Local stand-ins for hosted services, spoken to over their real protocols:
// an SMTP catcher (with a page and a JSON list of caught mail) and an S3-compatible store.
// Usage: node scripts/fakes.js <smtpPort> <mailWebPort> <s3Port> <s3Dir> <mailDir>
import { simpleParser } from 'mailparser';
import { createServer } from 'node:http';
import { mkdirSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import S3rver from 's3rver';
import { SMTPServer } from 'smtp-server';

const [smtpPort, webPort, s3Port, s3Dir, mailDir] = process.argv.slice(2);
mkdirSync(s3Dir, { recursive: true });
mkdirSync(mailDir, { recursive: true });

/** Set by POST /api/smtp/down to let tests see what the app does when mail is unreachable. */
let refuseMail = false;

const smtp = new SMTPServer({
	authOptional: true,
	disabledCommands: ['STARTTLS'],
	logger: false,
	onConnect(_session, cb) {
		if (refuseMail) return cb(new Error('mail catcher is refusing connections (test switch)'));
		cb();
	},
	onAuth(auth, _session, cb) {
		cb(null, { user: auth.username });
	},
	onData(stream, session, cb) {
		simpleParser(stream)
			.then((mail) => {
				const id = `${Date.now()}-${Math.random().toString(36).slice(2, 8)}`;
				const record = {
					id,
					receivedAt: new Date().toISOString(),
					envelopeFrom: session.envelope.mailFrom ? session.envelope.mailFrom.address : null,
					envelopeTo: session.envelope.rcptTo.map((r) => r.address),
					messageId: mail.messageId ?? null,
					subject: mail.subject ?? '',
					from: mail.from?.text ?? '',
					to: Array.isArray(mail.to)
						? mail.to.map((t) => t.text).join(', ')
						: (mail.to?.text ?? ''),
					text: mail.text ?? '',
					html: typeof mail.html === 'string' ? mail.html : '',
					headers: Object.fromEntries(
						[...mail.headers.entries()].filter(([, v]) => typeof v === 'string')
					)
				};
				writeFileSync(join(mailDir, `${id}.json`), JSON.stringify(record));
				cb();
			})
			.catch((err) => cb(err));
	}
});
smtp.on('error', (err) => console.error('smtp catcher:', err.message));
smtp.listen(Number(smtpPort), '127.0.0.1');

function messages() {
	return readdirSync(mailDir)
		.filter((f) => f.endsWith('.json'))
		.sort()
		.reverse()
		.map((f) => JSON.parse(readFileSync(join(mailDir, f), 'utf8')));
}

const esc = (s) =>
	String(s).replace(
		/[&<>"']/g,
		(c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]
	);

const web = createServer((req, res) => {
	const url = new URL(req.url ?? '/', 'http://x');
	if (url.pathname === '/api/messages' && req.method === 'GET') {
		res.writeHead(200, { 'content-type': 'application/json' });
		return res.end(JSON.stringify(messages()));
	}
	if (url.pathname === '/api/messages' && req.method === 'DELETE') {
		for (const f of readdirSync(mailDir)) if (f.endsWith('.json')) rmSync(join(mailDir, f));
		res.writeHead(204);
		return res.end();
	}
	if (url.pathname === '/api/smtp/down' && req.method === 'POST') {
		refuseMail = true;
		res.writeHead(204);
		return res.end();
	}
	if (url.pathname === '/api/smtp/up' && req.method === 'POST') {
		refuseMail = false;
		res.writeHead(204);
		return res.end();
	}
	const id = url.searchParams.get('id');
	const list = messages();
	const current = list.find((m) => m.id === id);
	res.writeHead(200, {
		'content-type': 'text/html; charset=utf-8',
		'content-security-policy':
			"default-src 'none'; style-src 'unsafe-inline'; frame-ancestors 'none'"
	});
	res.end(`<!doctype html><meta charset="utf-8"><title>Caught mail</title>
<style>body{font:16px system-ui;margin:0;display:flex;height:100vh}nav{width:40%;overflow:auto;border-right:1px solid #ccc}
a{display:block;padding:.6rem 1rem;border-bottom:1px solid #eee;color:#123;text-decoration:none}a:hover{background:#f4f6f8}
main{flex:1;padding:1rem;overflow:auto}pre{white-space:pre-wrap}small{color:#667}</style>
<nav><h1 style="padding:0 1rem">Caught mail (${list.length})</h1>${list
		.map(
			(m) =>
				`<a href="?id=${esc(m.id)}"><b>${esc(m.subject)}</b><br><small>${esc(m.to)} · ${esc(m.receivedAt)}</small></a>`
		)
		.join('')}</nav>
<main>${
		current
			? `<h2>${esc(current.subject)}</h2><p><small>From ${esc(current.from)} to ${esc(current.to)} at ${esc(current.receivedAt)}</small></p><pre>${esc(current.text)}</pre>`
			: '<p>Choose a message.</p>'
	}</main>`);
});
web.listen(Number(webPort), '127.0.0.1');

const s3 = new S3rver({
	port: Number(s3Port),
	address: '127.0.0.1',
	directory: s3Dir,
	silent: true,
	configureBuckets: [{ name: 'padbridge' }]
});
await s3.run();
console.info(
	`fakes up: smtp 127.0.0.1:${smtpPort}, mail page http://127.0.0.1:${webPort}, s3 http://127.0.0.1:${s3Port}`
);

const stop = () => {
	smtp.close(() => {});
	web.close();
	s3.close().finally(() => process.exit(0));
};
process.on('SIGTERM', stop);
process.on('SIGINT', stop);
