// A 100,000-row training-record export keeps the server's memory flat. The rows are made in a
// scratch database (bench/records/dataset.ts), a second built server (`node build`) is started
// against it on its own port, and the CSV and the XLSX are downloaded through it while the test
// reads that process's peak resident size (VmHWM in /proc/PID/status, reset before each export).
import mysql from 'mysql2/promise';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { applyMigrations } from '../../scripts/migrate.js';
import { ownerDb, ownerUrl, closeDbHelpers, testDbName, urlForDatabase } from '../helpers/db';
import { APP_URL } from '../helpers/http-session';
import { BENCH_HR_EMAIL, BENCH_HR_PASSWORD, fillRecordsDataset } from '../../bench/records/dataset';
import {
	download,
	memoryOf,
	resetPeak,
	signIn,
	startBuiltApp,
	type BuiltApp
} from '../../bench/records/server';

const PEOPLE = 5000; // × 20 rows each
const ROWS = 100_000;

// Two bounds, from figures measured on this 2-core machine (npm run bench:records, 100,000 rows):
// - Holding the same rows in memory (mysql2 rows, records and the CSV text) grows a process by
//   about 315 MiB. The second server runs with its V8 old space capped at HEAP_MIB, far below
//   that: an export that buffered the result would die of "heap out of memory" and fail here.
// - Its resident size may rise at most LIMIT_MIB above where it stood before the export. Streamed,
//   the CSV rose 4 MiB (uncapped) and the XLSX 16 MiB (capped at 96 MiB; uncapped, V8 lets garbage
//   pile up to a 118 MiB rise before collecting, which is why the cap is there), from about
//   155 MiB after warm-up. 100 MiB leaves room for collector timing on a busy machine and stays
//   far below the 315 MiB of a buffered export.
const HEAP_MIB = 128;
const LIMIT_MIB = 100;

const name = `${testDbName()}_scratch_records`;
const scratchUrl = urlForDatabase(ownerUrl(), name);
let app: BuiltApp | null = null;
let cookie = '';

beforeAll(async () => {
	const t0 = performance.now();
	const phase = (what: string) =>
		console.info(`setup: ${what} after ${((performance.now() - t0) / 1000).toFixed(1)} s`);
	const owner = ownerDb();
	await owner.query(`DROP DATABASE IF EXISTS \`${name}\``);
	await owner.query(`CREATE DATABASE \`${name}\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci`);
	await applyMigrations(scratchUrl);
	phase('migrations');
	const conn = await mysql.createConnection({ uri: scratchUrl, timezone: 'Z' });
	try {
		expect(await fillRecordsDataset(conn, PEOPLE)).toBe(ROWS);
	} finally {
		await conn.end();
	}
	phase(`${ROWS} rows`);
	app = await startBuiltApp(Number(new URL(APP_URL).port) + 7, scratchUrl, {
		...process.env,
		NODE_OPTIONS: `--max-old-space-size=${HEAP_MIB}`
	});
	phase('server up');
	cookie = await signIn(app.url, BENCH_HR_EMAIL, BENCH_HR_PASSWORD);
	phase('signed in');
	// Warm-up: load the page and every module an export uses, so the baseline includes them.
	await (await fetch(`${app.url}/records`, { headers: { cookie } })).arrayBuffer();
	for (const ext of ['csv', 'xlsx'])
		await download(`${app.url}/records/export.${ext}?person=B-000001`, cookie);
	phase('warm-up exports');
}, 120_000);

afterAll(async () => {
	await app?.stop();
	await ownerDb().query(`DROP DATABASE IF EXISTS \`${name}\``);
	await closeDbHelpers();
});

describe('100,000-row export', () => {
	for (const ext of ['csv', 'xlsx'] as const) {
		it(`streams the ${ext.toUpperCase()} with the server's memory bounded`, async () => {
			const pid = app!.pid;
			const reset = resetPeak(pid);
			const before = memoryOf(pid);
			const d = await download(`${app!.url}/records/export.${ext}`, cookie);
			const after = memoryOf(pid);
			expect(d.status).toBe(200);
			expect(d.recordCount).toBe(String(ROWS));
			if (ext === 'csv') {
				expect([...d.head.slice(0, 3)]).toEqual([0xef, 0xbb, 0xbf]);
				expect(d.lines).toBe(ROWS + 1);
			} else {
				expect(String.fromCharCode(d.head[0], d.head[1])).toBe('PK');
				expect(d.bytes).toBeGreaterThan(1_000_000);
			}
			const rise = after.peakMiB - (reset ? before.rssMiB : before.peakMiB);
			console.info(
				`${ext}: ${(d.bytes / 1048576).toFixed(1)} MiB in ${(d.totalMs / 1000).toFixed(1)} s; server RSS ${before.rssMiB.toFixed(0)} MiB before, peak ${after.peakMiB.toFixed(0)} MiB (+${rise.toFixed(0)} MiB${reset ? '' : ', peak not reset'})`
			);
			expect(rise).toBeLessThan(LIMIT_MIB);
		}, 300_000);
	}
});
