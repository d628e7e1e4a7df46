// Training-record exports at 100,000 rows: GET /records/export.csv and /records/export.xlsx on the
// built server (`npm run build` first), streamed to nowhere, timed to the last byte, with the
// server's peak resident memory (VmHWM from /proc, reset before each run). Beside them, measured
// in the same run: the floor, the same SELECT (same filter, same instant) streamed to a file by
// the `mariadb` command-line client with --batch --quick; and, for scale, what the whole result
// costs when it is held in memory (mysql2 rows plus the CSV text, in this process).
//
// Data: bench/records/dataset.ts in a scratch database `padbridge_scratch_records` on the dev
// MariaDB, dropped at the end. The app runs on the dev app port + 60.
// Usage: npm run bench:records     (BENCH_PEOPLE=5000 → 100,000 rows, BENCH_RUNS=3)
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, rmSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import mysql from 'mysql2/promise';
import { appEnv, modeConfig, root } from '../../scripts/lib.js';
import { median, openScratch } from '../lib/scratch';
import { BENCH_HR_EMAIL, BENCH_HR_PASSWORD, fillRecordsDataset } from './dataset';
import { download, memoryOf, resetPeak, signIn, startBuiltApp, type BuiltApp } from './server';

const PEOPLE = Number(process.env.BENCH_PEOPLE ?? 5000);
const RUNS = Number(process.env.BENCH_RUNS ?? 3);
const NAME = 'padbridge_scratch_records';

if (!existsSync(join(root, 'build', 'index.js'))) throw new Error('run `npm run build` first');
const cfg = modeConfig('dev');
const scratch = await openScratch(NAME);
let app: BuiltApp | null = null;
const work = mkdtempSync(join(tmpdir(), 'bench-records-'));

try {
	const t0 = performance.now();
	const rows = await fillRecordsDataset(scratch.conn, PEOPLE);
	const genS = (performance.now() - t0) / 1000;
	console.error(`${rows} rows generated in ${genS.toFixed(1)} s`);

	process.env.DATABASE_URL = scratch.url;
	const { recordsQuery } = await import('../../src/lib/server/records/query');
	const { pool } = await import('../../src/lib/server/db/index');

	app = await startBuiltApp(cfg.appPort + 60, scratch.url, { ...process.env, ...appEnv(cfg) });
	const cookie = await signIn(app.url, BENCH_HR_EMAIL, BENCH_HR_PASSWORD);
	// Warm-up: the page and one small export of each kind load every module the exports use.
	await (await fetch(`${app.url}/records`, { headers: { cookie } })).arrayBuffer();
	for (const ext of ['csv', 'xlsx'])
		await download(`${app.url}/records/export.${ext}?person=B-000001`, cookie);

	interface Result {
		what: string;
		seconds: number;
		firstMs: number;
		bytes: number;
		peakMiB: number | null;
		overMiB: number | null;
	}
	const results: Result[] = [];
	for (const ext of ['csv', 'xlsx'] as const) {
		const times: number[] = [];
		const firsts: number[] = [];
		let bytes = 0;
		let peak = 0;
		let over = 0;
		let reset = true;
		for (let i = 0; i < RUNS; i++) {
			reset = resetPeak(app.pid) && reset;
			const before = memoryOf(app.pid).rssMiB;
			const d = await download(`${app.url}/records/export.${ext}`, cookie);
			const m = memoryOf(app.pid);
			if (d.status !== 200 || d.recordCount !== String(rows))
				throw new Error(`${ext}: HTTP ${d.status}, ${d.recordCount} rows`);
			if (ext === 'csv' && d.lines !== rows + 1) throw new Error(`csv: ${d.lines} lines`);
			console.error(
				`${ext} run ${i + 1}: ${(d.totalMs / 1000).toFixed(2)} s, peak ${m.peakMiB.toFixed(0)} MiB`
			);
			times.push(d.totalMs / 1000);
			firsts.push(d.firstMs);
			bytes = d.bytes;
			peak = Math.max(peak, m.peakMiB);
			over = Math.max(over, m.peakMiB - before);
		}
		results.push({
			what: `${ext.toUpperCase()} export (HTTP, built server)`,
			seconds: median(times),
			firstMs: median(firsts),
			bytes,
			peakMiB: peak,
			overMiB: reset ? over : null
		});
	}

	// The Records page: the count and the first 50 rows of the whole plant. Its floor is the count
	// alone (the page cannot show less than how many rows match), run here through mysql2.
	const { countTrainingRecords } = await import('../../src/lib/server/records/index');
	const pageTimes: number[] = [];
	const countTimes: number[] = [];
	for (let i = 0; i < RUNS; i++) {
		const s = performance.now();
		const res = await fetch(`${app.url}/records`, { headers: { cookie } });
		const html = await res.text();
		pageTimes.push((performance.now() - s) / 1000);
		if (res.status !== 200 || !html.includes(`>${rows.toLocaleString('en')}</strong>`))
			throw new Error(`/records: HTTP ${res.status} without the row count ${rows}`);
		const c = performance.now();
		const n = await countTrainingRecords({}, new Date());
		countTimes.push((performance.now() - c) / 1000);
		if (n !== rows) throw new Error(`count: ${n}, expected ${rows}`);
		console.error(
			`page run ${i + 1}: ${pageTimes[i].toFixed(2)} s, count ${countTimes[i].toFixed(2)} s`
		);
	}

	// The floor: the same SELECT, same instant, streamed by the mariadb client to a file.
	const asOf = new Date();
	const q = recordsQuery({}, asOf);
	const text = mysql.format(q.sql, q.params, false, 'Z');
	const out = join(work, 'floor.tsv');
	const floorTimes: number[] = [];
	for (let i = 0; i < RUNS; i++) {
		const s = performance.now();
		const r = spawnSync(
			'sh',
			[
				'-c',
				`mariadb --no-defaults --socket="$1" -uroot --batch --quick "$2" > "$3"`,
				'sh',
				cfg.socket,
				NAME,
				out
			],
			{ input: text, stdio: ['pipe', 'inherit', 'inherit'] }
		);
		floorTimes.push((performance.now() - s) / 1000);
		if (r.status !== 0) throw new Error('the mariadb client failed');
	}
	const floorLines = spawnSync('wc', ['-l', out], { encoding: 'utf8' }).stdout.trim();
	if (Number(floorLines.split(' ')[0]) !== rows + 1)
		throw new Error(`floor: ${floorLines} lines, expected ${rows + 1}`);
	const floorS = median(floorTimes);
	const floorBytes = statSync(out).size;

	// For scale: the whole result held in memory (what streaming avoids).
	const { csvRow } = await import('../../src/lib/csv');
	const { csvCells } = await import('../../src/lib/server/records/columns');
	const { toTrainingRecord } = await import('../../src/lib/server/records/index');
	globalThis.gc?.();
	const rssBefore = process.memoryUsage().rss;
	const [all] = await pool.query(q.sql, q.params);
	const list = all as Parameters<typeof toTrainingRecord>[0][];
	const records = list.map((r) => toTrainingRecord(r, asOf));
	const csvText = records.map((r) => csvRow(csvCells(r, 'Asia/Ho_Chi_Minh'))).join('');
	const heldMiB = (process.memoryUsage().rss - rssBefore) / 1048576;
	await pool.end();

	const mib = (b: number) => (b / 1048576).toFixed(1);
	const f1 = (x: number | null) => (x == null ? 'n/a' : x.toFixed(1));
	console.log(
		`\nTraining-record exports, ${rows.toLocaleString('en')} rows (${PEOPLE.toLocaleString('en')} people × 20); data generated in ${genS.toFixed(1)} s; median of ${RUNS} runs; peak = server VmHWM, reset before each run\n`
	);
	console.log(
		'| what | seconds | rows/s | first byte ms | MiB out | peak RSS MiB | peak over start MiB | ratio to floor |'
	);
	console.log('| --- | ---: | ---: | ---: | ---: | ---: | ---: | ---: |');
	for (const r of results) {
		console.log(
			`| ${r.what} | ${r.seconds.toFixed(2)} | ${Math.round(rows / r.seconds).toLocaleString('en')} | ${r.firstMs.toFixed(0)} | ${mib(r.bytes)} | ${f1(r.peakMiB)} | ${f1(r.overMiB)} | ${(r.seconds / floorS).toFixed(1)}× |`
		);
	}
	console.log(
		`| floor: same SELECT, mariadb --batch --quick > file | ${floorS.toFixed(2)} | ${Math.round(rows / floorS).toLocaleString('en')} | | ${mib(floorBytes)} | | | 1.0× |`
	);
	const pageS = median(pageTimes);
	const countS = median(countTimes);
	console.log(
		`\nThe Records page (whole plant: the row count and the first 50 rows), median of ${RUNS} runs\n`
	);
	console.log('| what | seconds | ratio to floor |');
	console.log('| --- | ---: | ---: |');
	console.log(
		`| GET /records (HTTP, built server) | ${pageS.toFixed(2)} | ${(pageS / countS).toFixed(1)}× |`
	);
	console.log(`| floor: the count query alone (mysql2) | ${countS.toFixed(2)} | 1.0× |`);
	console.log(
		`\nFor scale: the same ${records.length.toLocaleString('en')} rows held in memory as mysql2 rows, records and the CSV text (${(csvText.length / 1e6).toFixed(1)} M characters) grow this process's RSS by ${heldMiB.toFixed(0)} MiB.`
	);
} finally {
	await app?.stop();
	await scratch.close();
	rmSync(work, { recursive: true, force: true });
}
