// Two app instances behind nginx (`npm test` starts them as its `cluster` step, the same way as
// `npm run cluster`): every request here goes through the balancer at TEST_APP_URL, and each answer
// names the instance that served it (X-Padbridge-Instance).
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createHash } from 'node:crypto';
import { request } from 'node:http';
import { setTimeout as sleep } from 'node:timers/promises';
import sharp from 'sharp';
import {
	appDb,
	closeDbHelpers,
	createTestPerson as createPerson,
	queryRows,
	retireTestPeople,
	type TestPerson as Person
} from '../helpers/db';
import { APP_URL, newClient, postPasswordSignIn } from '../helpers/http-session';
import {
	createTestPerson,
	makeInstruction,
	signIn,
	uniq,
	type Session
} from '../helpers/instruction-fixtures';
import { insertTestCertificate } from '../helpers/certificate-fixtures';
import { caughtFor } from '../helpers/mail-catcher';
import { sendPendingMail } from '../../src/lib/server/mail/send';

const INSTANCES = (process.env.CLUSTER_INSTANCES ?? '').split(',').filter(Boolean).sort();
const DAY = 86_400_000;
const instanceOf = (res: Response) => res.headers.get('x-padbridge-instance') ?? 'none';
const sha256 = (b: Uint8Array) => createHash('sha256').update(b).digest('hex');
const sorted = (s: Iterable<string>) => [...new Set(s)].sort();

afterAll(async () => {
	await retireTestPeople();
	await closeDbHelpers();
});

it('runs behind a balancer with two named instances', () => {
	expect(INSTANCES).toHaveLength(2);
	expect(APP_URL).toBe(process.env.TEST_APP_URL);
});

describe('requests and sessions', () => {
	it('spreads requests over both instances', async () => {
		const served: string[] = [];
		for (let i = 0; i < 10; i++) {
			const res = await fetch(`${APP_URL}/api/health`);
			expect(res.status).toBe(200);
			expect(await res.json()).toMatchObject({ status: 'ok' });
			served.push(instanceOf(res));
		}
		expect(sorted(served)).toEqual(INSTANCES);
		for (const name of INSTANCES)
			expect(served.filter((s) => s === name).length).toBeGreaterThanOrEqual(3);
	});

	it('keeps a session made on one instance valid on the other; a sign-out ends it on both', async () => {
		const person = await createPerson({ roles: ['trainer'] });
		const client = newClient();
		const signedIn = await postPasswordSignIn(client, person.email!, person.password);
		expect(signedIn.status).toBe(303);
		const madeOn = instanceOf(signedIn);
		expect(INSTANCES).toContain(madeOn);

		const served: string[] = [];
		for (let i = 0; i < 6; i++) {
			const res = await client.get('/');
			expect(res.status).toBe(200);
			expect(await res.text()).toContain(person.displayName);
			served.push(instanceOf(res));
		}
		expect(sorted(served)).toEqual(INSTANCES);

		const replay = client.clone();
		const out = await client.postForm('/signout', {});
		expect(out.status).toBe(303);
		const after: string[] = [];
		for (let i = 0; i < 4; i++) {
			const res = await replay.get('/');
			expect(res.status).toBe(303);
			expect(res.headers.get('location')).toMatch(/^\/signin/);
			after.push(instanceOf(res));
		}
		expect(sorted(after)).toEqual(INSTANCES);
	});

	it("records the client's address as the balancer saw it, not the one the client claims", async () => {
		const person = await createPerson({ roles: ['hr'] });
		// Any 127.x address is this machine; 127.0.0.2 tells the balancer's view apart from its own.
		const status = await new Promise<number>((resolve, reject) => {
			const url = new URL('/signin?/password', APP_URL);
			const req = request(
				{
					host: url.hostname,
					port: url.port,
					path: url.pathname + url.search,
					method: 'POST',
					localAddress: '127.0.0.2',
					headers: {
						'content-type': 'application/x-www-form-urlencoded',
						accept: 'text/html',
						origin: APP_URL,
						'x-forwarded-for': '203.0.113.7'
					}
				},
				(res) => {
					res.resume();
					res.on('end', () => resolve(res.statusCode ?? 0));
				}
			);
			req.on('error', reject);
			req.end(
				new URLSearchParams({
					email: person.email!,
					password: person.password,
					redirectTo: '/'
				}).toString()
			);
		});
		expect(status).toBe(303);
		const rows = await queryRows<{ address: string }>(
			appDb(),
			"SELECT address FROM audit_events WHERE action = 'auth.signin' AND entity_id = ?",
			[String(person.id)]
		);
		expect(rows.map((r) => r.address)).toEqual(['127.0.0.2']);
	});
});

describe('instructions', () => {
	it('finds a revision published on one instance from the other within seconds', async () => {
		const trainer = await createTestPerson(['trainer']);
		const quality = await createTestPerson(['quality']);
		const asQuality: Session = await signIn(quality);
		const word = `balanced${uniq()}`;
		const search = () => asQuality.fetch(`/api/v1/search?q=${word}`);

		// Both instances hold a built index before the publication, so the one that did not
		// publish must notice the change by itself.
		const warmed: string[] = [];
		for (let i = 0; i < 4; i++) {
			const res = await search();
			expect(res.status).toBe(200);
			expect((await res.json()).results).toEqual([]);
			warmed.push(instanceOf(res));
		}
		expect(sorted(warmed)).toEqual(INSTANCES);

		const fx = await makeInstruction(
			trainer,
			quality,
			[{ source: `# Balanced\n\n1. Check the ${word} mark before bonding.`, stop: 'review' }],
			{ title: `Cluster search ${word}` }
		);
		const published = await asQuality.fetch(
			`/instructions/${fx.docNumber}/revisions/A/review?/sign`,
			{
				method: 'POST',
				headers: { 'content-type': 'application/x-www-form-urlencoded', accept: 'text/html' },
				body: new URLSearchParams({
					meaning: 'approved',
					password: quality.password,
					effectiveDate: '',
					effectiveTime: '',
					comment: ''
				})
			}
		);
		expect(published.status).toBe(303);
		const publisher = instanceOf(published);
		const other = INSTANCES.find((n) => n !== publisher)!;
		const [rev] = await queryRows<{ state: string }>(
			appDb(),
			'SELECT state FROM revisions WHERE id = ?',
			[fx.revisionIds[0]]
		);
		expect(rev.state).toBe('approved');

		const started = Date.now();
		const foundAfter = new Map<string, number>();
		while (foundAfter.size < INSTANCES.length && Date.now() - started < 15_000) {
			const res = await search();
			const hits = (await res.json()).results as { docNumber: string }[];
			const name = instanceOf(res);
			if (hits.some((h) => h.docNumber === fx.docNumber) && !foundAfter.has(name))
				foundAfter.set(name, Date.now() - started);
			await sleep(100);
		}
		console.info(
			`search: published on ${publisher}; found on ${other} after ${foundAfter.get(other)} ms`
		);
		expect(sorted(foundAfter.keys())).toEqual(INSTANCES);
		// Each instance asks the database for the search epoch every 2 s.
		expect(foundAfter.get(other)!).toBeLessThan(8_000);
	});

	it('serves a file uploaded through one instance from both', async () => {
		const trainer = await createTestPerson(['trainer']);
		const quality = await createTestPerson(['quality']);
		const asTrainer = await signIn(trainer);
		const fx = await makeInstruction(trainer, quality, [{ source: '# Upload', stop: 'draft' }]);
		const png = await sharp({
			create: { width: 32, height: 20, channels: 3, background: { r: 200, g: 80, b: 30 } }
		})
			.png()
			.toBuffer();
		const form = new FormData();
		form.set('file', new Blob([new Uint8Array(png)], { type: 'image/png' }), 'cluster.png');
		const uploaded = await asTrainer.fetch(
			`/api/v1/instructions/${fx.docNumber}/revisions/A/files`,
			{ method: 'POST', body: form }
		);
		expect(uploaded.status).toBe(201);
		const { id } = await uploaded.json();
		const [row] = await queryRows<{ sha256: string; size_bytes: number }>(
			appDb(),
			'SELECT sha256, size_bytes FROM revision_files WHERE id = ?',
			[id]
		);
		const served: string[] = [];
		for (let i = 0; i < 4; i++) {
			const res = await asTrainer.fetch(`/instructions/${fx.docNumber}/revisions/A/files/${id}`);
			expect(res.status).toBe(200);
			const bytes = new Uint8Array(await res.arrayBuffer());
			expect(bytes.byteLength).toBe(row.size_bytes);
			expect(sha256(bytes)).toBe(row.sha256);
			served.push(instanceOf(res));
		}
		expect(INSTANCES).toContain(instanceOf(uploaded));
		expect(sorted(served)).toEqual(INSTANCES);
	});
});

interface Lease {
	name: string;
	holder: string | null;
	last_run_at: Date | null;
}

const JOBS = ['mail-send', 'mail-reminders'];

async function leases(): Promise<Map<string, Lease>> {
	const rows = await queryRows<Lease>(
		appDb(),
		'SELECT name, holder, last_run_at FROM job_leases WHERE name IN (?)',
		[JOBS]
	);
	return new Map(rows.map((r) => [r.name, r]));
}

/**
 * Frees the jobs' leases, as if their intervals had passed, and waits for the runs that follow:
 * both instances tick every 15 s and the first to try takes each lease. Returns who ran what.
 */
async function freeAndAwaitRuns(): Promise<Map<string, string>> {
	const before = await leases();
	await appDb().query('UPDATE job_leases SET lease_until = NULL WHERE name IN (?)', [JOBS]);
	const until = Date.now() + 25_000;
	while (Date.now() < until) {
		const now = await leases();
		const ran = JOBS.filter(
			(j) => now.get(j)?.last_run_at?.getTime() !== before.get(j)?.last_run_at?.getTime()
		);
		if (ran.length === JOBS.length)
			return new Map(JOBS.map((j) => [j, now.get(j)!.holder!.split(':')[0]]));
		await sleep(100);
	}
	throw new Error(`${JOBS.join(' and ')} did not both run within 25 s of their leases being freed`);
}

describe('scheduled jobs', () => {
	let holder: Person;
	let key: string;
	const ranBy = new Map<string, string[]>(JOBS.map((j) => [j, []]));

	beforeAll(async () => {
		// Earlier steps leave mail due that their tests drove with clocks of their own. The app's
		// sender sends it from here first (claims make that safe beside the instances' own runs),
		// so the reminder below does not wait behind batches of 25.
		let drained = 0;
		for (let i = 0; i < 40; i++) {
			const r = await sendPendingMail();
			drained += r.sent;
			if (r.sent + r.failed + r.gaveUp + r.released === 0) break;
		}
		console.info(`sent ${drained} messages that earlier steps had left due`);
		holder = await createPerson({ roles: ['operator'] });
		const cert = await insertTestCertificate({
			personId: holder.id,
			processCode: 'FOG-MB',
			expiresAt: new Date(Date.now() + 20 * DAY)
		});
		key = `expiring_30:certificate:${cert.id}`;
	});

	const sentAt = async () =>
		(
			await queryRows<{ sent_at: Date | null }>(
				appDb(),
				'SELECT sent_at FROM mail_outbox WHERE dedupe_key = ?',
				[key]
			)
		)[0]?.sent_at ?? null;

	it('gives each run to one instance, and the next free lease to whichever ticks first', async () => {
		// Right after one instance's runs the other instance ticks next, so two rounds normally
		// land on both; more rounds cover instances whose ticks fall close together. In the first
		// round the reminder is queued (the sender runs before it in a tick), in the next it is sent.
		const everywhere = () => JOBS.every((j) => sorted(ranBy.get(j)!).length === INSTANCES.length);
		for (let i = 0; i < 5 && !(everywhere() && (await sentAt())); i++) {
			for (const [job, instance] of await freeAndAwaitRuns()) ranBy.get(job)!.push(instance);
		}
		console.info(
			`runs after freeing the leases: ${JOBS.map((j) => `${j} ${ranBy.get(j)!.join(', ')}`).join('; ')}`
		);
		for (const j of JOBS) expect(sorted(ranBy.get(j)!)).toEqual(INSTANCES);
		// Every reminder run saw the certificate; its 30-day reminder was queued exactly once.
		const queued = await queryRows<{ n: number }>(
			appDb(),
			'SELECT COUNT(*) AS n FROM mail_outbox WHERE dedupe_key = ?',
			[key]
		);
		expect(Number(queued[0].n)).toBe(1);
	});

	it('sends the reminder once although both instances ran the sender', async () => {
		const rows = await queryRows<{ sent_at: Date | null; attempts: number }>(
			appDb(),
			'SELECT sent_at, attempts FROM mail_outbox WHERE dedupe_key = ?',
			[key]
		);
		expect(rows).toHaveLength(1);
		expect(rows[0].sent_at).not.toBeNull();
		expect(rows[0].attempts).toBe(0);
		let mail = await caughtFor(holder.email!);
		for (let i = 0; i < 20 && mail.length === 0; i++) {
			await sleep(100);
			mail = await caughtFor(holder.email!);
		}
		expect(mail).toHaveLength(1);
		expect(mail[0].subject).toMatch(/certificate expires in 30 days/);
		// The link in the mail points at the balancer, the address people use.
		expect(mail[0].text).toContain(`${APP_URL}/`);
	});
});
