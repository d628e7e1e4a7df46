// The public verification page: no sign-in, found by the token's hash, initials unless the rule
// allows the full name, never ids or employee numbers, 404 for unknown codes, 429 over the limit.
// Each test speaks from its own loopback address (127.x.y.z) so the per-address limit is its own.
import http from 'node:http';
import { randomInt } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDbHelpers, createTestPerson, retireTestPeople, type TestPerson } from '../helpers/db';
import { APP_URL } from '../helpers/http-session';
import { insertTestCertificate, type TestCertificate } from '../helpers/certificate-fixtures';

const LIMIT = Number(process.env.VERIFY_MAX_PER_WINDOW ?? 30);

function freshAddress() {
	return `127.${randomInt(1, 250)}.${randomInt(1, 250)}.${randomInt(2, 250)}`;
}

function getFrom(address: string, path: string) {
	const url = new URL(path, APP_URL);
	return new Promise<{ status: number; headers: http.IncomingHttpHeaders; body: string }>(
		(resolve, reject) => {
			const req = http.request(
				{
					host: url.hostname,
					port: url.port,
					path: url.pathname,
					localAddress: address,
					headers: { accept: 'text/html' }
				},
				(res) => {
					let body = '';
					res.setEncoding('utf8');
					res.on('data', (c) => (body += c));
					res.on('end', () => resolve({ status: res.statusCode ?? 0, headers: res.headers, body }));
				}
			);
			req.on('error', reject);
			req.end();
		}
	);
}

let holder: TestPerson;
let cert: TestCertificate;

beforeAll(async () => {
	holder = await createTestPerson({
		roles: ['operator'],
		withEmail: false,
		displayName: 'Phạm Quốc Bảo'
	});
	cert = await insertTestCertificate({ personId: holder.id, processCode: 'COG-MB' });
});

afterAll(async () => {
	await retireTestPeople();
	await closeDbHelpers();
});

describe('verification page', () => {
	it('shows initials, process, status and expiry to a visitor who is not signed in, and nothing else', async () => {
		const res = await getFrom(freshAddress(), `/verify/${cert.token}`);
		expect(res.status).toBe(200);
		expect(res.headers['x-robots-tag']).toContain('noindex');
		expect(res.body).toContain('P. Q. B.');
		expect(res.body).toContain('COG main bond');
		expect(res.body).toContain('Valid');
		expect(res.body).not.toContain('Phạm Quốc Bảo');
		expect(res.body).not.toContain(holder.employeeNo);
		expect(res.body).not.toContain(holder.badge!);
		expect(res.body).not.toContain(cert.number);
		expect(res.body).not.toMatch(new RegExp(`"id":\\s*${cert.id}\\b`));
	});

	it('shows the full name when the rule version allows it', async () => {
		const named = await insertTestCertificate({
			personId: holder.id,
			processCode: 'FOG-MB',
			showFullNameOnVerify: true
		});
		const res = await getFrom(freshAddress(), `/verify/${named.token}`);
		expect(res.status).toBe(200);
		expect(res.body).toContain('Phạm Quốc Bảo');
		expect(res.body).not.toContain(holder.employeeNo);
	});

	it('shows the derived status: a suspended certificate reads Suspended', async () => {
		const s = await insertTestCertificate({
			personId: holder.id,
			processCode: 'COG-MB',
			state: 'suspended'
		});
		const res = await getFrom(freshAddress(), `/verify/${s.token}`);
		expect(res.status).toBe(200);
		expect(res.body).toContain('Suspended');
		expect(res.body).not.toContain('>Valid<');
	});

	it('answers an unknown code with a plain 404 page', async () => {
		const res = await getFrom(freshAddress(), `/verify/${'A'.repeat(43)}`);
		expect(res.status).toBe(404);
		expect(res.body).toContain('No certificate matches this code');
		expect(res.headers['x-robots-tag']).toContain('noindex');
	});

	it(`answers 429 after ${LIMIT} look-ups from one address, and other addresses still work`, async () => {
		const address = freshAddress();
		for (let i = 0; i < LIMIT; i++) {
			const res = await getFrom(address, `/verify/unknown-code-${i}-xxxxxxxxxxxx`);
			expect(res.status, `look-up ${i + 1}`).toBe(404);
		}
		const over = await getFrom(address, `/verify/${cert.token}`);
		expect(over.status).toBe(429);
		expect(over.body).toContain('Too many look-ups from this address');
		expect(over.body).not.toContain('P. Q. B.');
		const elsewhere = await getFrom(freshAddress(), `/verify/${cert.token}`);
		expect(elsewhere.status).toBe(200);
	});
});
