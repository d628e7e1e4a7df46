// First-run bootstrap: with ADMIN_EMAIL and ADMIN_PASSWORD set, start-up makes sure that admin
// exists, is active, holds the admin role and has that password; running it again changes nothing.
import { randomBytes } from 'node:crypto';
import { afterAll, describe, expect, it, vi } from 'vitest';
import { appDb, closeDbHelpers, queryRows } from '../helpers/db';
import { signInWithPassword } from '../helpers/http-session';

const email = `bootstrap-${randomBytes(4).toString('hex')}@test.kbo2.example`;
const firstPassword = 'bootstrap-first-passphrase';
const secondPassword = 'bootstrap-second-passphrase';

type People = typeof import('../../src/lib/server/people');

/** The people module as start-up sees it with these settings (config is read at import). */
async function withSettings(password: string): Promise<People> {
	vi.resetModules();
	vi.stubEnv('ADMIN_EMAIL', email.toUpperCase());
	vi.stubEnv('ADMIN_PASSWORD', password);
	return import('../../src/lib/server/people');
}

async function auditCount() {
	const [row] = await queryRows<{ n: number }>(
		appDb(),
		"SELECT COUNT(*) AS n FROM audit_events WHERE action LIKE 'person.bootstrap_admin%' AND JSON_VALUE(new_values, '$.email') = ?",
		[email]
	);
	return Number(row.n);
}

async function person() {
	const rows = await queryRows<{ id: number; active: number; roles: string }>(
		appDb(),
		`SELECT p.id, p.active, (SELECT GROUP_CONCAT(role) FROM role_assignments r WHERE r.person_id = p.id) AS roles
		 FROM people p WHERE p.email = ?`,
		[email]
	);
	return rows;
}

const pools: { end: () => Promise<void> }[] = [];

afterAll(async () => {
	await appDb().query('UPDATE people SET active = 0 WHERE email = ?', [email]);
	vi.unstubAllEnvs();
	await Promise.all(pools.map((p) => p.end()));
	await closeDbHelpers();
});

async function run(password: string) {
	const people = await withSettings(password);
	await people.ensureBootstrapAdmin();
	pools.push((await import('../../src/lib/server/db')).pool);
}

describe('ensureBootstrapAdmin', () => {
	it('creates the admin (e-mail stored in lower case) with that password', async () => {
		await run(firstPassword);
		const rows = await person();
		expect(rows).toHaveLength(1);
		expect(rows[0]).toMatchObject({ active: 1, roles: 'admin' });
		expect(await auditCount()).toBe(1);
		const client = await signInWithPassword(email, firstPassword);
		expect((await client.get('/admin/people')).status).toBe(200);
	});

	it('changes nothing when run again with the same settings', async () => {
		await run(firstPassword);
		expect(await person()).toHaveLength(1);
		expect(await auditCount()).toBe(1);
	});

	it('puts back the password, the active flag and the admin role when they were changed', async () => {
		const [{ id }] = await person();
		const session = await signInWithPassword(email, firstPassword);
		await appDb().query('UPDATE people SET active = 0 WHERE id = ?', [id]);
		await appDb().query('DELETE FROM role_assignments WHERE person_id = ?', [id]);
		await run(secondPassword);
		expect(await person()).toEqual([{ id, active: 1, roles: 'admin' }]);
		expect(await auditCount()).toBe(2);
		// Old sessions stay closed, and only the new password works.
		expect((await session.get('/')).status).toBe(303);
		await signInWithPassword(email, secondPassword);
		await expect(signInWithPassword(email, firstPassword)).rejects.toThrow(/HTTP 400/);
	});

	it('does nothing without both settings', async () => {
		vi.resetModules();
		vi.stubEnv('ADMIN_EMAIL', `other-${email}`);
		vi.stubEnv('ADMIN_PASSWORD', '');
		const people: People = await import('../../src/lib/server/people');
		await people.ensureBootstrapAdmin();
		pools.push((await import('../../src/lib/server/db')).pool);
		const rows = await queryRows(appDb(), 'SELECT id FROM people WHERE email = ?', [
			`other-${email}`
		]);
		expect(rows).toEqual([]);
	});
});
