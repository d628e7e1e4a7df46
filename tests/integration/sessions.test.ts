// Sessions are re-checked on every request: what an admin changes takes effect on the person's
// very next request, and a signed-out cookie stays dead when replayed.
import { describe, expect, it } from 'vitest';
import { localDate } from '../../src/lib/time';
import { appDb, createTestPerson, queryRows, type TestPerson } from '../helpers/db';
import {
	newClient,
	postPasswordSignIn,
	SESSION_COOKIE,
	signInMessage,
	signInWithBadge,
	signInWithPassword,
	type HttpClient
} from '../helpers/http-session';
import { useDemoSession } from '../helpers/lifecycle';

const PLANT_ZONE = 'Asia/Ho_Chi_Minh';
const admin = useDemoSession('admin');

/** The person form as the edit page posts it, with the given roles. */
function personForm(p: TestPerson, roles: string[]) {
	return {
		employeeNo: p.employeeNo,
		displayName: p.displayName,
		email: p.email ?? '',
		badgeNo: p.badge ?? '',
		locale: 'en',
		employmentType: 'employee',
		roles
	};
}

async function expectSignedOut(client: HttpClient, path = '/') {
	const res = await client.get(path);
	expect(res.status).toBe(303);
	expect(res.headers.get('location')).toBe(`/signin?redirectTo=${encodeURIComponent(path)}`);
}

async function expectOk(client: HttpClient, path = '/') {
	const res = await client.get(path);
	expect(res.status, `${path}: ${(await res.text()).slice(0, 200)}`).toBe(200);
}

async function latestAudit(action: string, entityId: number) {
	const [row] = await queryRows<{
		actor_label: string;
		reason: string | null;
		address: string | null;
	}>(
		appDb(),
		'SELECT actor_label, reason, address FROM audit_events WHERE action = ? AND entity_id = ? ORDER BY seq DESC LIMIT 1',
		[action, String(entityId)]
	);
	return row;
}

describe('session invalidation', () => {
	it('signs a deactivated person out on their very next request', async () => {
		const p = await createTestPerson({ roles: ['operator'] });
		const client = await signInWithPassword(p.email!, p.password);
		await expectOk(client);

		const res = await admin.client.postForm(`/admin/people/${p.id}?/deactivate`, {
			reason: 'left the company'
		});
		expect(res.status).toBe(303);
		await expectSignedOut(client);
		expect(await latestAudit('person.deactivate', p.id)).toMatchObject({
			actor_label: 'Tomasz Wójcik',
			reason: 'left the company'
		});

		// Reactivation restores the person, not the old session.
		const back = await admin.client.postForm(`/admin/people/${p.id}?/reactivate`, {
			reason: 'rehired'
		});
		expect(back.status).toBe(303);
		await expectSignedOut(client);
		await expectOk(await signInWithPassword(p.email!, p.password));
	});

	it('stops a removed role on the next request, without signing the person out', async () => {
		const p = await createTestPerson({ roles: ['operator', 'admin'] });
		const client = await signInWithPassword(p.email!, p.password);
		await expectOk(client, '/admin/people');

		const saved = await admin.client.postForm(
			`/admin/people/${p.id}?/save`,
			personForm(p, ['operator'])
		);
		expect(saved.status).toBe(200);
		const denied = await client.get('/admin/people');
		expect(denied.status).toBe(403);
		expect(await denied.text()).toContain('Your roles: operator');
		await expectOk(client, '/');
		expect(await latestAudit('person.update_roles', p.id)).toMatchObject({
			actor_label: 'Tomasz Wójcik'
		});

		// And a role given back works at once too.
		await admin.client.postForm(
			`/admin/people/${p.id}?/save`,
			personForm(p, ['operator', 'admin'])
		);
		await expectOk(client, '/admin/people');
	});

	it('ends every session of the person when an admin resets their password', async () => {
		const p = await createTestPerson({ roles: ['quality'] });
		const first = await signInWithPassword(p.email!, p.password);
		const second = await signInWithBadge(p.badge!, p.pin);
		const newPassword = 'a-fresh-passphrase-for-tests';

		const res = await admin.client.postForm(`/admin/people/${p.id}?/reset`, {
			kind: 'password',
			secret: newPassword,
			reason: 'forgot it'
		});
		expect(res.status).toBe(200);
		expect(await res.text()).toContain('New password set.');
		await expectSignedOut(first);
		await expectSignedOut(second);

		const old = await postPasswordSignIn(newClient(), p.email!, p.password);
		expect(old.status).toBe(400);
		await expectOk(await signInWithPassword(p.email!, newPassword));
		// The secret itself never reaches the audit trail.
		const [row] = await queryRows<{ n: number }>(
			appDb(),
			'SELECT COUNT(*) AS n FROM audit_events WHERE entity_id = ? AND (CAST(new_values AS CHAR) LIKE ? OR reason LIKE ?)',
			[String(p.id), `%${newPassword}%`, `%${newPassword}%`]
		);
		expect(Number(row.n)).toBe(0);
	});

	it('ends the session when a PIN is reset', async () => {
		const p = await createTestPerson({ roles: ['operator'], withEmail: false });
		const client = await signInWithBadge(p.badge!, p.pin);
		await expectOk(client);
		const res = await admin.client.postForm(`/admin/people/${p.id}?/reset`, {
			kind: 'pin',
			secret: '86420975',
			reason: 'badge shared by mistake'
		});
		expect(res.status).toBe(200);
		await expectSignedOut(client);
		await expectOk(await signInWithBadge(p.badge!, '86420975'));
	});

	it('refuses a replayed cookie after sign-out', async () => {
		const p = await createTestPerson({ roles: ['trainer'] });
		const client = await signInWithPassword(p.email!, p.password);
		const stolen = client.clone();
		await expectOk(client);

		const out = await client.postForm('/signout', {});
		expect(out.status).toBe(303);
		expect(out.headers.get('location')).toBe('/signin?signedOut=1');
		expect(client.cookies.has(SESSION_COOKIE)).toBe(false);
		await expectSignedOut(client);

		// The old cookie is still a well-formed token, but its server-side session is closed.
		expect(stolen.cookies.has(SESSION_COOKIE)).toBe(true);
		await expectSignedOut(stolen);
		const [session] = await queryRows<{ revoked_at: Date | null }>(
			appDb(),
			'SELECT revoked_at FROM auth_sessions WHERE person_id = ? ORDER BY created_at DESC LIMIT 1',
			[p.id]
		);
		expect(session.revoked_at).toBeInstanceOf(Date);
	});

	it('treats an expired session as signed out', async () => {
		const p = await createTestPerson({ roles: ['hr'] });
		const client = await signInWithPassword(p.email!, p.password);
		await expectOk(client);
		await appDb().query(
			'UPDATE auth_sessions SET expires_at = ? WHERE person_id = ? AND revoked_at IS NULL',
			[new Date(Date.now() - 1000), p.id]
		);
		await expectSignedOut(client);
	});

	it('treats a forged or garbled cookie as signed out, not as an error', async () => {
		const forged = newClient(new Map([[SESSION_COOKIE, 'not-a-real-token']]));
		await expectSignedOut(forged);
	});
});

describe('agency contracts', () => {
	const yesterday = () => localDate(new Date(Date.now() - 86_400_000), PLANT_ZONE);
	const today = () => localDate(new Date(), PLANT_ZONE);

	it('refuses sign-in after the contract end date, with the usual message', async () => {
		const p = await createTestPerson({
			roles: ['operator'],
			employmentType: 'agency',
			contractEndsOn: yesterday()
		});
		const res = await postPasswordSignIn(newClient(), p.email!, p.password);
		expect(res.status).toBe(400);
		expect(signInMessage(await res.text())).toBe('That did not match. Check and try again.');
	});

	it('allows the whole last day, and ends the session once it has passed', async () => {
		const p = await createTestPerson({
			roles: ['operator'],
			employmentType: 'agency',
			contractEndsOn: today()
		});
		const client = await signInWithBadge(p.badge!, p.pin);
		await expectOk(client);
		await appDb().query('UPDATE people SET contract_ends_on = ? WHERE id = ?', [yesterday(), p.id]);
		await expectSignedOut(client);
	});
});
