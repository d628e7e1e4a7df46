// The committed migrations build the whole schema on an empty database, and match the Drizzle
// schema the code is written against. Runs on a scratch database the owner user may create.
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { is } from 'drizzle-orm';
import { toSnakeCase } from 'drizzle-orm/casing';
import { getTableConfig, MySqlTable } from 'drizzle-orm/mysql-core';
import mysql from 'mysql2/promise';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { applyMigrations } from '../../scripts/migrate.js';
import { GENESIS_HASH } from '../../src/lib/server/audit/chain';
import * as schema from '../../src/lib/server/db/schema';
import { ownerUrl, testDbName, urlForDatabase } from '../helpers/db';

const scratch = `${testDbName()}_scratch`;
const scratchUrl = urlForDatabase(ownerUrl(), scratch);
let conn: mysql.Connection;

const journal = JSON.parse(readFileSync(join(process.cwd(), 'drizzle/meta/_journal.json'), 'utf8'));

const tables = Object.values(schema as Record<string, unknown>)
	.filter((t): t is MySqlTable => is(t, MySqlTable))
	.map((t) => getTableConfig(t));

async function columnsOf(table: string): Promise<string[]> {
	const [rows] = await conn.query<mysql.RowDataPacket[]>(
		'SELECT column_name AS name FROM information_schema.columns WHERE table_schema = ? AND table_name = ?',
		[scratch, table]
	);
	return rows.map((r) => r.name as string).sort();
}

beforeAll(async () => {
	conn = await mysql.createConnection({ uri: ownerUrl(), timezone: 'Z' });
	await conn.query(`DROP DATABASE IF EXISTS \`${scratch}\``);
	await conn.query(
		`CREATE DATABASE \`${scratch}\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci`
	);
});

afterAll(async () => {
	await conn.query(`DROP DATABASE IF EXISTS \`${scratch}\``);
	await conn.end();
});

describe('migrations on an empty database', () => {
	it('apply from empty without errors', async () => {
		const [before] = await conn.query<mysql.RowDataPacket[]>(
			'SELECT COUNT(*) AS n FROM information_schema.tables WHERE table_schema = ?',
			[scratch]
		);
		expect(Number(before[0].n)).toBe(0);
		await applyMigrations(scratchUrl);
		const [applied] = await conn.query<mysql.RowDataPacket[]>(
			`SELECT COUNT(*) AS n FROM \`${scratch}\`.__drizzle_migrations`
		);
		expect(Number(applied[0].n)).toBe(journal.entries.length);
	});

	it('create every table of the Drizzle schema with its columns', async () => {
		expect(tables.map((t) => t.name)).toEqual(
			expect.arrayContaining([
				'people',
				'role_assignments',
				'sites',
				'lines',
				'shifts',
				'processes',
				'stations',
				'station_processes',
				'auth_sessions',
				'sign_in_failures',
				'audit_events',
				'audit_chain'
			])
		);
		for (const t of tables) {
			const expected = t.columns.map((c) => (c.keyAsName ? toSnakeCase(c.name) : c.name)).sort();
			expect(await columnsOf(t.name), `columns of ${t.name}`).toEqual(expected);
		}
	});

	it('leave no table behind that the schema does not know', async () => {
		const [rows] = await conn.query<mysql.RowDataPacket[]>(
			"SELECT table_name AS name FROM information_schema.tables WHERE table_schema = ? AND table_name NOT LIKE '\\_\\_drizzle%'",
			[scratch]
		);
		expect(rows.map((r) => r.name as string).sort()).toEqual(tables.map((t) => t.name).sort());
	});

	it('write the audit chain genesis row', async () => {
		const [rows] = await conn.query<mysql.RowDataPacket[]>(
			`SELECT id, last_seq, last_hash FROM \`${scratch}\`.audit_chain`
		);
		expect(rows).toEqual([{ id: 1, last_seq: 0, last_hash: GENESIS_HASH }]);
		const [events] = await conn.query<mysql.RowDataPacket[]>(
			`SELECT COUNT(*) AS n FROM \`${scratch}\`.audit_events`
		);
		expect(Number(events[0].n)).toBe(0);
	});

	it('are a no-op when applied again', async () => {
		await applyMigrations(scratchUrl);
		const [applied] = await conn.query<mysql.RowDataPacket[]>(
			`SELECT COUNT(*) AS n FROM \`${scratch}\`.__drizzle_migrations`
		);
		expect(Number(applied[0].n)).toBe(journal.entries.length);
		const [chain] = await conn.query<mysql.RowDataPacket[]>(
			`SELECT COUNT(*) AS n FROM \`${scratch}\`.audit_chain`
		);
		expect(Number(chain[0].n)).toBe(1);
	});
});
