// Applies the committed Drizzle migrations in drizzle/ as the owner user, then re-grants the app user.
import { drizzle } from 'drizzle-orm/mysql2';
import { migrate } from 'drizzle-orm/mysql2/migrator';
import mysql from 'mysql2/promise';
import { join } from 'node:path';
import { root } from './lib.js';

/** Runs every pending migration against the database at `url`. */
export async function applyMigrations(url) {
	const conn = await mysql.createConnection({ uri: url, multipleStatements: true, timezone: 'Z' });
	try {
		await migrate(drizzle(conn), { migrationsFolder: join(root, 'drizzle') });
	} finally {
		await conn.end();
	}
}
