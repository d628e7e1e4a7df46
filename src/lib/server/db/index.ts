import { drizzle } from 'drizzle-orm/mysql2';
import mysql from 'mysql2/promise';
import * as schema from './schema';

// process.env rather than $env so seed and maintenance scripts (run with tsx) share this module.
const env = process.env;
const url = env.DATABASE_URL ?? 'mysql://padbridge_app@127.0.0.1:3406/padbridge';

/** One pool per process, created at module scope. */
export const pool = mysql.createPool({
	uri: url,
	timezone: 'Z',
	connectionLimit: Number(env.DB_POOL_SIZE ?? 10),
	connectTimeout: 3000,
	enableKeepAlive: true,
	charset: 'utf8mb4_unicode_ci'
});

export const db = drizzle(pool, { schema, mode: 'default', casing: 'snake_case' });
export type Db = typeof db;
export type Tx = Parameters<Parameters<Db['transaction']>[0]>[0];
export type DbOrTx = Db | Tx;
