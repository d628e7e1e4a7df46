// Certificate pages over HTTP: a holder sees and downloads their own, nobody else's (404 without
// data); quality sees all and suspends, reinstates, withdraws with a reason, audited old → new.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { and, desc, eq, like } from 'drizzle-orm';
import { db } from '../../src/lib/server/db/index';
import { auditEvents, certificates, mailOutbox } from '../../src/lib/server/db/schema/index';
import { closeDbHelpers, createTestPerson, retireTestPeople, type TestPerson } from '../helpers/db';
import { signInAsDemo, signInWithBadge, type HttpClient } from '../helpers/http-session';
import { insertTestCertificate, type TestCertificate } from '../helpers/certificate-fixtures';

let holder: TestPerson;
let stranger: TestPerson;
let cert: TestCertificate;
let holderHttp: HttpClient;
let strangerHttp: HttpClient;

beforeAll(async () => {
	holder = await createTestPerson({ roles: ['operator'], withEmail: false });
	stranger = await createTestPerson({ roles: ['operator'], withEmail: false });
	cert = await insertTestCertificate({ personId: holder.id, processCode: 'FOG-MB', withPdf: true });
	holderHttp = await signInWithBadge(holder.badge!, holder.pin);
	strangerHttp = await signInWithBadge(stranger.badge!, stranger.pin);
});

afterAll(async () => {
	await retireTestPeople();
	await closeDbHelpers();
});

async function latestAudit(action: string) {
	const [e] = await db
		.select()
		.from(auditEvents)
		.where(and(eq(auditEvents.action, action), eq(auditEvents.entityId, String(cert.id))))
		.orderBy(desc(auditEvents.seq))
		.limit(1);
	return e;
}

describe('the holder', () => {
	it('sees their certificate with status word, process and dates, and downloads the PDF', async () => {
		const list = await holderHttp.get('/certificates');
		expect(list.status).toBe(200);
		const html = await list.text();
		expect(html).toContain(cert.number);
		expect(html).toContain('FOG-MB');
		expect(html).toContain('Valid');
		const detail = await holderHttp.get(`/certificates/${cert.id}`);
		expect(detail.status).toBe(200);
		const pdf = await holderHttp.get(`/certificates/${cert.id}/pdf`);
		expect(pdf.status).toBe(200);
		expect(pdf.headers.get('content-type')).toBe('application/pdf');
		const bytes = new Uint8Array(await pdf.arrayBuffer());
		expect(new TextDecoder().decode(bytes.subarray(0, 5))).toBe('%PDF-');
	});
});

describe('someone else', () => {
	it('gets 404 with no data for the detail and the PDF, and does not see it listed', async () => {
		for (const path of [`/certificates/${cert.id}`, `/certificates/${cert.id}/pdf`]) {
			const res = await strangerHttp.get(path);
			expect(res.status, path).toBe(404);
			const body = await res.text();
			expect(body).not.toContain(cert.number);
			expect(body).not.toContain(holder.displayName);
		}
		const list = await (await strangerHttp.get('/certificates')).text();
		expect(list).not.toContain(cert.number);
	});

	it('a line lead sees only their own certificates on /certificates and 404 on the holder’s', async () => {
		const lead = await signInAsDemo('lead');
		const list = await lead.get('/certificates');
		expect(list.status).toBe(200);
		expect(await list.text()).not.toContain(cert.number);
		expect((await lead.get(`/certificates/${cert.id}`)).status).toBe(404);
	});

	it('an operator posting a suspension gets 403 and nothing changes', async () => {
		const res = await strangerHttp.postForm(`/certificates/${cert.id}?/suspend`, {
			reason: 'not mine to suspend'
		});
		expect(res.status).toBe(403);
		const [row] = await db.select().from(certificates).where(eq(certificates.id, cert.id));
		expect(row.state).toBe('active');
	});
});

describe('quality', () => {
	let quality: HttpClient;
	beforeAll(async () => {
		quality = await signInAsDemo('quality');
	});

	it('sees every certificate with a filter, and the detail with the holder', async () => {
		const list = await quality.get(`/certificates?q=${encodeURIComponent(cert.number)}`);
		expect(list.status).toBe(200);
		const html = await list.text();
		expect(html).toContain(cert.number);
		expect(html).toContain(holder.displayName);
		const detail = await (await quality.get(`/certificates/${cert.id}`)).text();
		expect(detail).toContain('Basis records');
	});

	it('refuses a suspension without a reason with a field error', async () => {
		const res = await quality.postForm(`/certificates/${cert.id}?/suspend`, { reason: '   ' });
		expect(res.status).toBe(400);
		expect(await res.text()).toContain('Give the reason; it is kept in the audit trail.');
		const [row] = await db.select().from(certificates).where(eq(certificates.id, cert.id));
		expect(row.state).toBe('active');
	});

	it('suspends with a reason, then reinstates; both audited with old and new state', async () => {
		let res = await quality.postForm(`/certificates/${cert.id}?/suspend`, {
			reason: 'Indentation failures on L2-FOG-03, under review'
		});
		expect(res.status).toBe(303);
		let [row] = await db.select().from(certificates).where(eq(certificates.id, cert.id));
		expect(row.state).toBe('suspended');
		expect(row.stateReason).toBe('Indentation failures on L2-FOG-03, under review');
		const suspended = await latestAudit('certificate.suspended');
		expect(suspended.oldValues).toEqual({ state: 'active' });
		expect(suspended.newValues).toEqual({ state: 'suspended' });
		expect(suspended.reason).toBe('Indentation failures on L2-FOG-03, under review');
		// The holder (or their lead) is told, through the outbox written in the same transaction.
		const mail = await db
			.select({ kind: mailOutbox.kind })
			.from(mailOutbox)
			.where(like(mailOutbox.dedupeKey, `suspended:certificate:${cert.id}:%`));
		expect(mail.map((m) => m.kind)).toEqual(['suspended']);

		const page = await (await holderHttp.get('/certificates')).text();
		expect(page).toContain('Suspended');

		res = await quality.postForm(`/certificates/${cert.id}?/reinstate`, {
			reason: 'Review closed, root cause was the buffer sheet'
		});
		expect(res.status).toBe(303);
		[row] = await db.select().from(certificates).where(eq(certificates.id, cert.id));
		expect(row.state).toBe('active');
		const reinstated = await latestAudit('certificate.reinstated');
		expect(reinstated.oldValues).toEqual({ state: 'suspended' });
		expect(reinstated.newValues).toEqual({ state: 'active' });
	});

	it('withdraws for good: a withdrawn certificate cannot be reinstated', async () => {
		const other = await insertTestCertificate({ personId: holder.id, processCode: 'COG-MB' });
		let res = await quality.postForm(`/certificates/${other.id}?/withdraw`, {
			reason: 'Issued on a wrong record'
		});
		expect(res.status).toBe(303);
		res = await quality.postForm(`/certificates/${other.id}?/reinstate`, { reason: 'try' });
		expect(res.status).toBe(409);
		const [row] = await db.select().from(certificates).where(eq(certificates.id, other.id));
		expect(row.state).toBe('withdrawn');
	});
});
