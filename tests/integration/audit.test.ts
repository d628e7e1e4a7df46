// The audit trail: written in the same transaction as the change, one unbroken hash chain even under
// concurrent writers, edits and deletions found by the verifier, and MariaDB itself refusing the
// app user's UPDATE, DELETE and TRUNCATE. Tampering is undone in each test, so the shared test
// database's chain verifies again afterwards (the last test checks that).
import { eq } from 'drizzle-orm';
import mysql from 'mysql2/promise';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { APPEND_ONLY_TABLES } from '../../scripts/append-only.js';
import { recordAudit, recordAuditNow, verifyAuditChain } from '../../src/lib/server/audit';
import { db, pool } from '../../src/lib/server/db';
import { people } from '../../src/lib/server/db/schema';
import { ConflictError, createPerson } from '../../src/lib/server/people';
import { personSchema } from '../../src/lib/schemas/people';
import {
	appUrl,
	closeDbHelpers,
	createTestPerson,
	demoPersonId,
	ownerDb,
	queryRows,
	retireTestPeople,
	testDbName
} from '../helpers/db';
import { signInAsDemo, signInWithPassword } from '../helpers/http-session';

const actor = { id: null, label: 'audit integration test', address: '2001:db8::a' };

interface AuditRow {
	seq: number;
	reason: string | null;
	new_values: unknown;
	hash: string;
	prev_hash: string;
	[k: string]: unknown;
}

async function head() {
	const [row] = await queryRows<{ last_seq: number; last_hash: string }>(
		ownerDb(),
		'SELECT last_seq, last_hash FROM audit_chain WHERE id = 1'
	);
	return row;
}

async function rowAt(seq: number): Promise<AuditRow> {
	const [row] = await queryRows<AuditRow>(ownerDb(), 'SELECT * FROM audit_events WHERE seq = ?', [
		seq
	]);
	return row;
}

async function displayNameOf(personId: number) {
	const [row] = await queryRows<{ display_name: string }>(
		ownerDb(),
		'SELECT display_name FROM people WHERE id = ?',
		[personId]
	);
	return row.display_name;
}

/** Puts a removed row back exactly as it was, as the owner. */
async function reinsert(row: AuditRow) {
	await ownerDb().query('INSERT INTO audit_events SET ?', [row]);
}

let appConn: mysql.Connection;

beforeAll(async () => {
	appConn = await mysql.createConnection({ uri: appUrl(), timezone: 'Z' });
});

afterAll(async () => {
	await appConn.end();
	await retireTestPeople();
	await closeDbHelpers();
	await pool.end();
});

describe('audit rows are written with the change, or not at all', () => {
	it('finds the chain intact before anything here touches it', async () => {
		const result = await verifyAuditChain();
		expect(result.problems).toEqual([]);
		expect(result.ok).toBe(true);
		expect(result.checked).toBe((await head()).last_seq);
	});

	it('rolls back both the change and its audit row when the transaction fails later', async () => {
		const p = await createTestPerson({ roles: ['operator'] });
		const before = await head();
		await expect(
			db.transaction(async (tx) => {
				await tx.update(people).set({ displayName: 'Renamed' }).where(eq(people.id, p.id));
				await recordAudit(tx, actor, {
					action: 'person.update',
					entityType: 'person',
					entityId: p.id,
					newValues: { displayName: 'Renamed' }
				});
				throw new Error('something after the audit row failed');
			})
		).rejects.toThrow('something after the audit row failed');
		expect(await displayNameOf(p.id)).toBe(p.displayName);
		expect(await head()).toEqual(before);
		const [n] = await queryRows<{ n: number }>(
			ownerDb(),
			'SELECT COUNT(*) AS n FROM audit_events WHERE seq > ?',
			[before.last_seq]
		);
		expect(Number(n.n)).toBe(0);
	});

	it('rolls back the change when its audit row cannot be written', async () => {
		const p = await createTestPerson({ roles: ['operator'] });
		const before = await head();
		await expect(
			db.transaction(async (tx) => {
				await tx.update(people).set({ displayName: 'Renamed' }).where(eq(people.id, p.id));
				// Longer than the column allows: MariaDB (strict mode) refuses the row.
				await recordAudit(tx, actor, { action: 'x'.repeat(65), entityType: 'person' });
			})
		).rejects.toThrow();
		expect(await displayNameOf(p.id)).toBe(p.displayName);
		expect(await head()).toEqual(before);
	});

	it('writes no audit row for a change that was refused', async () => {
		const taken = await createTestPerson({ roles: ['operator'] });
		const before = await head();
		const input = personSchema.parse({
			employeeNo: `${taken.employeeNo}-B`,
			displayName: 'Duplicate e-mail',
			email: taken.email,
			roles: ['operator']
		});
		await expect(createPerson(actor, input, null)).rejects.toBeInstanceOf(ConflictError);
		expect(await head()).toEqual(before);
	});

	it('records who, what, which entity, old and new values, when (UTC) and from where', async () => {
		const admin = await signInAsDemo('admin');
		const adminId = await demoPersonId('admin@kbo2.example');
		const p = await createTestPerson({ roles: ['operator'], withEmail: false });
		const startedMs = Date.now();
		const res = await admin.postForm(`/admin/people/${p.id}?/save`, {
			employeeNo: p.employeeNo,
			displayName: 'Đỗ Thị Renamed 王',
			badgeNo: p.badge!,
			locale: 'en',
			employmentType: 'employee',
			roles: ['operator']
		});
		expect(res.status).toBe(200);
		const [row] = await queryRows<Record<string, unknown>>(
			ownerDb(),
			"SELECT * FROM audit_events WHERE action = 'person.update' AND entity_id = ? ORDER BY seq DESC LIMIT 1",
			[String(p.id)]
		);
		expect(row).toMatchObject({
			actor_id: adminId,
			actor_label: 'Tomasz Wójcik',
			entity_type: 'person',
			entity_id: String(p.id),
			address: '127.0.0.1'
		});
		const json = (v: unknown) => (typeof v === 'string' ? JSON.parse(v) : v);
		expect(json(row.old_values)).toEqual({ displayName: p.displayName });
		expect(json(row.new_values)).toEqual({ displayName: 'Đỗ Thị Renamed 王' });
		// Stored in UTC: the server runs in +00:00 and the pool reads with timezone 'Z'.
		const at = (row.at as Date).getTime();
		expect(at).toBeGreaterThanOrEqual(startedMs - 1000);
		expect(at).toBeLessThanOrEqual(Date.now() + 1000);
	});
});

describe('the hash chain', () => {
	it('stays gap-free with 20 writers at once, in this process and in the server', async () => {
		const before = await head();
		const p = await createTestPerson({ roles: ['operator'] });
		// Sign-ins through the server write their own audit rows at the same time.
		const [seqs] = await Promise.all([
			Promise.all(
				Array.from({ length: 20 }, (_, i) =>
					recordAuditNow(actor, {
						action: 'test.concurrent',
						entityType: 'test',
						entityId: i,
						newValues: { i, note: 'parallel write' }
					})
				)
			),
			Promise.all(Array.from({ length: 5 }, () => signInWithPassword(p.email!, p.password)))
		]);
		expect(new Set(seqs).size).toBe(20);
		const after = await head();
		// 20 rows from here and one sign-in row per server sign-in, with no gaps and no forks.
		expect(after.last_seq - before.last_seq).toBe(25);
		const rows = await queryRows<{ seq: number; prev_hash: string; hash: string }>(
			ownerDb(),
			'SELECT seq, prev_hash, hash FROM audit_events WHERE seq > ? ORDER BY seq',
			[before.last_seq]
		);
		expect(rows.map((r) => r.seq)).toEqual(
			Array.from({ length: 25 }, (_, i) => before.last_seq + 1 + i)
		);
		rows.forEach((r, i) => {
			expect(r.prev_hash).toBe(i === 0 ? before.last_hash : rows[i - 1].hash);
		});
		expect((await verifyAuditChain()).ok).toBe(true);
	});

	it('detects an edited row and names it', async () => {
		const seq = await recordAuditNow(actor, {
			action: 'test.tamper',
			entityType: 'test',
			reason: 'the original reason'
		});
		await recordAuditNow(actor, { action: 'test.after', entityType: 'test' });
		try {
			await ownerDb().query('UPDATE audit_events SET reason = ? WHERE seq = ?', [
				'a quietly changed reason',
				seq
			]);
			const result = await verifyAuditChain();
			expect(result.ok).toBe(false);
			expect(result.problems).toEqual([{ seq, problem: 'content changed after it was written' }]);
		} finally {
			await ownerDb().query('UPDATE audit_events SET reason = ? WHERE seq = ?', [
				'the original reason',
				seq
			]);
		}
		expect((await verifyAuditChain()).ok).toBe(true);
	});

	it('detects edited values, even when the forger recomputes that row’s own hash', async () => {
		const seq = await recordAuditNow(actor, {
			action: 'test.tamper',
			entityType: 'test',
			newValues: { forceN: 72 }
		});
		await recordAuditNow(actor, { action: 'test.after', entityType: 'test' });
		const original = await rowAt(seq);
		try {
			await ownerDb().query(
				'UPDATE audit_events SET new_values = ?, hash = SHA2(CONCAT(hash, ?), 256) WHERE seq = ?',
				['{"forceN":27}', 'forged', seq]
			);
			const result = await verifyAuditChain();
			expect(result.ok).toBe(false);
			expect(result.problems).toEqual(
				expect.arrayContaining([
					{ seq, problem: 'content changed after it was written' },
					{ seq: seq + 1, problem: 'does not link to the previous row' }
				])
			);
		} finally {
			await ownerDb().query('UPDATE audit_events SET new_values = ?, hash = ? WHERE seq = ?', [
				original.new_values === null || typeof original.new_values === 'string'
					? original.new_values
					: JSON.stringify(original.new_values),
				original.hash,
				seq
			]);
		}
		expect((await verifyAuditChain()).ok).toBe(true);
	});

	it('detects a deleted row in the middle of the chain', async () => {
		const seq = await recordAuditNow(actor, { action: 'test.delete', entityType: 'test' });
		await recordAuditNow(actor, { action: 'test.after', entityType: 'test' });
		const original = await rowAt(seq);
		await ownerDb().query('DELETE FROM audit_events WHERE seq = ?', [seq]);
		try {
			const result = await verifyAuditChain();
			expect(result.ok).toBe(false);
			expect(result.problems).toEqual(
				expect.arrayContaining([{ seq, problem: `rows ${seq}–${seq} are missing` }])
			);
		} finally {
			await reinsert(original);
		}
		expect((await verifyAuditChain()).ok).toBe(true);
	});

	it('detects the newest row deleted (the chain head still points at it)', async () => {
		const seq = await recordAuditNow(actor, { action: 'test.delete', entityType: 'test' });
		const original = await rowAt(seq);
		await ownerDb().query('DELETE FROM audit_events WHERE seq = ?', [seq]);
		try {
			const result = await verifyAuditChain();
			expect(result.ok).toBe(false);
			expect(result.problems).toEqual([
				{ seq, problem: 'the newest rows are missing (chain head points past them)' }
			]);
		} finally {
			await reinsert(original);
		}
		expect((await verifyAuditChain()).ok).toBe(true);
	});
});

describe('MariaDB grants for the app user', () => {
	const existing = async () =>
		(
			await queryRows<{ name: string }>(
				ownerDb(),
				'SELECT table_name AS name FROM information_schema.tables WHERE table_schema = ?',
				[testDbName()]
			)
		)
			.map((r) => r.name)
			.filter((t) => APPEND_ONLY_TABLES.includes(t));

	const refused = async (sql: string) => {
		const err = await appConn.query(sql).then(
			() => null,
			(e: { errno?: number; code?: string }) => e
		);
		expect(err, sql).not.toBeNull();
		expect(err?.errno, sql).toBe(1142);
		expect(err?.code, sql).toBe('ER_TABLEACCESS_DENIED_ERROR');
	};

	it('refuses UPDATE, DELETE and TRUNCATE on audit_events', async () => {
		await refused("UPDATE audit_events SET reason = 'changed' WHERE seq = 1");
		await refused('DELETE FROM audit_events WHERE seq = 1');
		await refused('TRUNCATE TABLE audit_events');
	});

	it('refuses UPDATE and DELETE on every append-only table that exists', async () => {
		const tables = await existing();
		expect(tables).toContain('audit_events');
		for (const t of tables) {
			await refused(`UPDATE \`${t}\` SET \`${t === 'audit_events' ? 'reason' : 'id'}\` = NULL`);
			await refused(`DELETE FROM \`${t}\``);
		}
	});

	it('grants exactly SELECT and INSERT on append-only tables, and no DDL anywhere', async () => {
		const tables = await existing();
		const [grants] = await appConn.query<mysql.RowDataPacket[]>('SHOW GRANTS');
		const text = grants.map((g) => Object.values(g)[0] as string);
		for (const t of tables) {
			const line = text.find((g) => g.includes(`\`${t}\``));
			expect(line, t).toMatch(/^GRANT SELECT, INSERT ON /);
		}
		await refused('ALTER TABLE people ADD COLUMN sneaky INT');
		await refused('DROP TABLE sign_in_failures');
	});

	it('still lets the app user append and read', async () => {
		const seq = await recordAuditNow(actor, { action: 'test.append', entityType: 'test' });
		const [rows] = await appConn.query<mysql.RowDataPacket[]>(
			'SELECT action FROM audit_events WHERE seq = ?',
			[seq]
		);
		expect(rows[0].action).toBe('test.append');
	});
});

describe('after all of the above', () => {
	it('leaves the shared chain verifying', async () => {
		const result = await verifyAuditChain();
		expect(result.problems).toEqual([]);
		expect(result.ok).toBe(true);
	});
});
