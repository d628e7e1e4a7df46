// Search latency over 1,000 instructions × 3 revisions: Padbridge's flexsearch index (the real
// searchInstructions path, snippets included) against MariaDB FULLTEXT on the same rows, the floor
// to beat. Data goes into a scratch database (padbridge_scratch_bench) on the dev MariaDB, which is
// dropped at the end. Usage: npm run bench:instructions:search
import mysql from 'mysql2/promise';
import { createHash } from 'node:crypto';
import {
	dbUrls,
	ensureDatabase,
	modeConfig,
	startMariadb,
	stopMariadb
} from '../../scripts/lib.js';
import { applyMigrations } from '../../scripts/migrate.js';
import { DEMO_INSTRUCTIONS } from '../../scripts/seed-instruction-content';

const INSTRUCTIONS = 1000;
const ITERATIONS = 60;
const SCRATCH = 'padbridge_scratch_bench';
const QUERIES = [
	'buffer sheet',
	'thaw',
	'indentation marks',
	'peel',
	'IPA wipe',
	'calibration meter',
	'wrist strap',
	'recipe',
	'alignment',
	'lot417',
	'tweezers chip',
	'floor life'
];

const cfg = modeConfig('dev');
const maria = await startMariadb(cfg);
ensureDatabase(cfg);
const ownerBase = dbUrls(cfg).owner;
const scratchUrl = ownerBase.replace(/\/[^/]+$/, `/${SCRATCH}`);
const admin = await mysql.createConnection({ uri: ownerBase });
await admin.query(`DROP DATABASE IF EXISTS \`${SCRATCH}\``);
await admin.query(
	`CREATE DATABASE \`${SCRATCH}\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci`
);
await applyMigrations(scratchUrl);

const conn = await mysql.createConnection({
	uri: scratchUrl,
	timezone: 'Z',
	multipleStatements: true
});
const WORDS =
	'bond head stage film reel pad bump lead glass panel sheet force pressure temperature time recipe check lot station line shift operator microscope wipe strap mat tray carrier cycle alarm hold tag'.split(
		' '
	);
const hash = (s: string) => createHash('sha256').update(s).digest('hex');

console.log(`generating ${INSTRUCTIONS} instructions × 3 revisions in ${SCRATCH} …`);
const t0 = performance.now();
await conn.query(
	`INSERT INTO people (employee_no, display_name, locale, employment_type, active, session_version, created_at, updated_at) VALUES ('B1', 'Bench', 'en', 'employee', 1, 1, NOW(3), NOW(3))`
);
const day = 86_400_000;
for (let i = 0; i < INSTRUCTIONS; i++) {
	const demo = DEMO_INSTRUCTIONS[i % DEMO_INSTRUCTIONS.length];
	const [res] = await conn.query<mysql.ResultSetHeader>(
		'INSERT INTO instructions (doc_number, title, owner_id, created_at) VALUES (?, ?, 1, NOW(3))',
		[`WI-B${String(i).padStart(4, '0')}-${demo.docNumber.split('-')[1]}`, `${demo.title} (${i})`]
	);
	const rows: unknown[][] = [];
	for (let k = 0; k < 3; k++) {
		const base = demo.revisions[Math.min(k, demo.revisions.length - 1)].source;
		const extra = Array.from(
			{ length: 120 },
			(_, w) => WORDS[(i * 7 + k * 13 + w * 3) % WORDS.length]
		).join(' ');
		const source = `${base}\n\nNotes for lot${i} rev ${k}: ${extra}.\n`;
		const state = k < 2 ? 'approved' : 'draft';
		const eff =
			k === 0 ? new Date(Date.now() - 300 * day) : k === 1 ? new Date(Date.now() - 30 * day) : null;
		rows.push([
			res.insertId,
			'ABC'[k],
			state,
			source,
			hash(source),
			1,
			new Date(),
			new Date(),
			eff,
			1
		]);
	}
	await conn.query(
		'INSERT INTO revisions (instruction_id, letter, state, source, content_hash, author_id, created_at, updated_at, effective_from, version) VALUES ?',
		[rows]
	);
}
const genMs = performance.now() - t0;

const tFt = performance.now();
await conn.query('ALTER TABLE revisions ADD FULLTEXT INDEX ft_revisions_source (source)');
await conn.query(
	'ALTER TABLE instructions ADD FULLTEXT INDEX ft_instructions_title (title, doc_number)'
);
const ftBuildMs = performance.now() - tFt;

// The app's search module reads DATABASE_URL when first imported.
process.env.DATABASE_URL = scratchUrl;
const { searchInstructions, EPOCH_CHECK_MS } = await import('../../src/lib/server/search/index');
const { pool } = await import('../../src/lib/server/db/index');
const heapBefore = process.memoryUsage().heapUsed;
const tIdx = performance.now();
await searchInstructions('warm', 'effective'); // the first search builds the index
const idxBuildMs = performance.now() - tIdx;
const heapMb = (process.memoryUsage().heapUsed - heapBefore) / 1024 / 1024;

// A publication by "another instance": one revision changes and the epoch row moves on.
await conn.query(
	"UPDATE revisions SET source = CONCAT(source, ' freshword'), content_hash = SHA2(CONCAT(source, ' freshword'), 256) WHERE id = 2"
);
await conn.query(
	'INSERT INTO search_epoch (id, epoch, changed_at) VALUES (1, 1, NOW(3)) ON DUPLICATE KEY UPDATE epoch = epoch + 1'
);
await new Promise((r) => setTimeout(r, EPOCH_CHECK_MS + 100));
const tSync = performance.now();
const fresh = await searchInstructions('freshword', 'effective');
const syncMs = performance.now() - tSync;
if (fresh.length !== 1) throw new Error('the changed revision was not found after the epoch moved');

const ftSql = `SELECT i.doc_number, i.title, r.letter,
	MATCH(r.source) AGAINST(? IN BOOLEAN MODE) + 4 * MATCH(i.title, i.doc_number) AGAINST(? IN BOOLEAN MODE) AS score
FROM revisions r JOIN instructions i ON i.id = r.instruction_id
WHERE r.state = 'approved' AND r.effective_from <= NOW(3)
	AND NOT EXISTS (SELECT 1 FROM revisions r2 WHERE r2.instruction_id = r.instruction_id AND r2.state = 'approved'
		AND r2.effective_from <= NOW(3) AND r2.effective_from > r.effective_from)
	AND (MATCH(r.source) AGAINST(? IN BOOLEAN MODE) OR MATCH(i.title, i.doc_number) AGAINST(? IN BOOLEAN MODE))
ORDER BY score DESC LIMIT 20`;
const boolean = (q: string) =>
	q
		.split(/\s+/)
		.filter(Boolean)
		.map((w) => `+${w.replace(/[^\p{L}\p{N}]/gu, '')}*`)
		.join(' ');

function stats(ms: number[]) {
	const s = [...ms].sort((a, b) => a - b);
	const at = (p: number) => s[Math.min(s.length - 1, Math.floor(p * s.length))];
	return { p50: at(0.5), p95: at(0.95), mean: s.reduce((a, b) => a + b, 0) / s.length };
}

const results: {
	q: string;
	flex: ReturnType<typeof stats>;
	ft: ReturnType<typeof stats>;
	flexHits: number;
	ftHits: number;
}[] = [];
for (const q of QUERIES) {
	const flex: number[] = [];
	const ft: number[] = [];
	let flexHits = 0;
	let ftHits = 0;
	const b = boolean(q);
	for (let n = 0; n < ITERATIONS + 5; n++) {
		const a = performance.now();
		const hits = await searchInstructions(q, 'effective');
		const mid = performance.now();
		const [rows] = await conn.query<mysql.RowDataPacket[]>(ftSql, [b, b, b, b]);
		const end = performance.now();
		if (n >= 5) {
			flex.push(mid - a);
			ft.push(end - mid);
		}
		flexHits = hits.length;
		ftHits = rows.length;
	}
	results.push({ q, flex: stats(flex), ft: stats(ft), flexHits, ftHits });
}

const f = (n: number) => n.toFixed(2);
console.log(
	`\nSearch over ${INSTRUCTIONS} instructions × 3 revisions (effective scope, top 20), ${ITERATIONS} runs per query`
);
console.log(
	`data generated in ${(genMs / 1000).toFixed(1)} s; FULLTEXT indexes built in ${(ftBuildMs / 1000).toFixed(1)} s; flexsearch index built on the first search in ${(idxBuildMs / 1000).toFixed(2)} s (~${heapMb.toFixed(0)} MB heap); after a publication by another instance the next search caught up in ${syncMs.toFixed(0)} ms\n`
);
console.log('| query | flexsearch p50 ms | p95 ms | FULLTEXT p50 ms | p95 ms | hits flex / FT |');
console.log('|---|---:|---:|---:|---:|---:|');
for (const r of results)
	console.log(
		`| ${r.q} | ${f(r.flex.p50)} | ${f(r.flex.p95)} | ${f(r.ft.p50)} | ${f(r.ft.p95)} | ${r.flexHits} / ${r.ftHits} |`
	);
const all = (k: 'flex' | 'ft', m: 'p50' | 'p95' | 'mean') =>
	results.reduce((s, r) => s + r[k][m], 0) / results.length;
console.log(
	`| **mean of queries** | **${f(all('flex', 'p50'))}** | ${f(all('flex', 'p95'))} | **${f(all('ft', 'p50'))}** | ${f(all('ft', 'p95'))} | |`
);
console.log(
	`\nflexsearch vs the FULLTEXT floor (mean p50): ${(all('ft', 'p50') / all('flex', 'p50')).toFixed(1)}× ${all('flex', 'p50') < all('ft', 'p50') ? 'faster' : 'slower'}`
);

await pool.end();
await conn.end();
await admin.query(`DROP DATABASE IF EXISTS \`${SCRATCH}\``);
await admin.end();
if (maria.started) stopMariadb(cfg);
