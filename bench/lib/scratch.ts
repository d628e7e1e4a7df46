// A scratch database on the dev MariaDB for benchmarks: created fresh with every migration,
// dropped by `close()`. MariaDB is started when it is not running, and stopped again after.
import mysql from 'mysql2/promise';
import {
	dbUrls,
	ensureDatabase,
	modeConfig,
	startMariadb,
	stopMariadb
} from '../../scripts/lib.js';
import { applyMigrations } from '../../scripts/migrate.js';

export async function openScratch(name: string) {
	const cfg = modeConfig('dev');
	const maria = await startMariadb(cfg);
	ensureDatabase(cfg);
	const ownerBase = dbUrls(cfg).owner;
	const url = ownerBase.replace(/\/[^/]+$/, `/${name}`);
	const admin = await mysql.createConnection({ uri: ownerBase });
	await admin.query(`DROP DATABASE IF EXISTS \`${name}\``);
	await admin.query(`CREATE DATABASE \`${name}\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci`);
	await applyMigrations(url);
	const conn = await mysql.createConnection({ uri: url, timezone: 'Z', multipleStatements: true });
	return {
		url,
		conn,
		async close() {
			await conn.end();
			await admin.query(`DROP DATABASE IF EXISTS \`${name}\``);
			await admin.end();
			if (maria.started) stopMariadb(cfg);
		}
	};
}

export const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];

/** Median wall time of `runs` calls after one warm-up call. */
export async function timeMedian(fn: () => Promise<unknown>, runs: number) {
	await fn();
	const ts: number[] = [];
	for (let i = 0; i < runs; i++) {
		const s = performance.now();
		await fn();
		ts.push(performance.now() - s);
	}
	return median(ts);
}
