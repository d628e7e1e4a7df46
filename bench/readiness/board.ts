// The Readiness board at plant scale: one line with 500 people on three shifts × 30 processes on
// 15 stations (two processes each), with certificates in every state, open assignments and a few
// supervised runs. Timed: readinessBoard() for the whole line and for one shift, and the CSV of
// it, beside a floor measured in the same run: the bare SQL SELECTs reading the same rows through
// mysql2 with no application logic. Scratch database on the dev MariaDB, dropped at the end.
// Usage: npm run bench:readiness
import { openScratch, timeMedian } from '../lib/scratch';

const PEOPLE = 500;
const PROCESSES = 30;
const STATIONS = 15;
const RUNS = 9;
const DAY = 86_400_000;

const scratch = await openScratch('padbridge_scratch_readiness');
const { conn } = scratch;
const now = Date.now();
const at = (days: number) => new Date(now + days * DAY);

const t0 = performance.now();
await conn.query(
	"INSERT INTO sites (id, code, name, time_zone) VALUES (1, 'KBO-2', 'Bench plant', 'Asia/Ho_Chi_Minh')"
);
await conn.query(
	"INSERT INTO `lines` (id, site_id, code, name, active) VALUES (1, 1, 'L1', 'Bench line', 1)"
);
await conn.query(
	`INSERT INTO shifts (id, site_id, code, name, starts_at, ends_at) VALUES
	 (1, 1, 'A', 'Early', '06:00', '14:00'), (2, 1, 'B', 'Late', '14:00', '22:00'), (3, 1, 'C', 'Night', '22:00', '06:00')`
);
await conn.query(
	`INSERT INTO people (id, employee_no, display_name, locale, employment_type, site_id, line_id, shift_id, active, session_version, created_at, updated_at)
	 SELECT seq, CONCAT('B-', seq), CONCAT('Bench person ', seq), 'en', IF(seq % 10 = 0, 'agency', 'employee'),
	   1, 1, 1 + seq % 3, 1, 1, NOW(3), NOW(3) FROM seq_1_to_${PEOPLE}`
);
await conn.query(
	`INSERT INTO processes (id, code, name, bond_type, active)
	 SELECT seq, CONCAT('P', LPAD(seq, 2, '0')), CONCAT('Bench process ', seq), 'COG', 1 FROM seq_1_to_${PROCESSES}`
);
await conn.query(
	`INSERT INTO stations (id, line_id, code, name, min_qualified, active)
	 SELECT seq, 1, CONCAT('L1-B-', LPAD(seq, 2, '0')), CONCAT('Bench station ', seq), 40, 1 FROM seq_1_to_${STATIONS}`
);
await conn.query(
	`INSERT INTO station_processes (station_id, process_id)
	 SELECT 1 + (seq - 1) % ${STATIONS}, seq FROM seq_1_to_${PROCESSES}`
);
await conn.query(
	`INSERT INTO certification_rules (id, process_id, version, pass_mark_pct, practical_required, validity_months, grace_days, reminder_days, show_full_name_on_verify, created_by, created_at, active_from)
	 SELECT seq, seq, 1, 80, 0, 12, 14, '[30,7]', 0, 1, NOW(3), ? FROM seq_1_to_${PROCESSES}`,
	[at(-300)]
);
// Four in five cells hold a certificate; the state and the expiry vary with the cell.
await conn.query(
	`INSERT INTO certificates (number, person_id, process_id, rule_id, state, issued_at, expires_at, signer_name, signer_role, verify_token_hash, grace_until)
	 SELECT CONCAT('B-', p.seq, '-', r.seq), p.seq, r.seq, r.seq,
	   ELT(1 + (p.seq + r.seq) % 10, 'active','active','active','active','active','active','retraining_due','expired','suspended','active'),
	   ?, DATE_ADD(?, INTERVAL CAST((p.seq * 7 + r.seq * 13) % 400 AS SIGNED) - 20 DAY), 'Bench', 'Quality',
	   SHA2(CONCAT(p.seq, '-', r.seq), 256), DATE_ADD(?, INTERVAL CAST((p.seq + r.seq) % 20 AS SIGNED) - 5 DAY)
	 FROM seq_1_to_${PEOPLE} p JOIN seq_1_to_${PROCESSES} r WHERE (p.seq + 2 * r.seq) % 5 <> 0`,
	[at(-200), new Date(now), new Date(now)]
);
await conn.query(
	`INSERT INTO assignments (person_id, process_id, scope, assigned_by, assigned_at)
	 SELECT p.seq, r.seq, 'person', 1, NOW(3) FROM seq_1_to_${PEOPLE} p JOIN seq_1_to_${PROCESSES} r
	 WHERE (p.seq + 2 * r.seq) % 5 = 0 AND p.seq % 2 = 0`
);
await conn.query(
	`INSERT INTO supervised_runs (person_id, station_id, supervisor_id, granted_by, reason, starts_at, ends_at, created_at)
	 SELECT seq * 10, 1 + seq % ${STATIONS}, 1, 1, 'bench', ?, ?, NOW(3) FROM seq_1_to_20`,
	[at(-0.1), at(0.2)]
);
const genMs = performance.now() - t0;

process.env.DATABASE_URL = scratch.url;
const { readinessBoard } = await import('../../src/lib/server/readiness/index');
const { readinessCsv } = await import('../../src/lib/server/readiness/csv');
const { pool } = await import('../../src/lib/server/db/index');

// The floor: the same rows read by bare SELECTs on the same pool, in parallel like the board.
const ids = `SELECT id FROM people WHERE line_id = 1 AND active = 1`;
async function floor(shift: number | null) {
	const shiftCond = shift ? ` AND shift_id = ${shift}` : '';
	await pool.query(
		'SELECT l.id, s.time_zone FROM `lines` l JOIN sites s ON s.id = l.site_id WHERE l.id = 1'
	);
	await Promise.all([
		pool.query(
			`SELECT s.id, s.code, s.name, s.min_qualified, p.id, p.code, p.name FROM stations s
			 JOIN station_processes sp ON sp.station_id = s.id JOIN processes p ON p.id = sp.process_id
			 WHERE s.line_id = 1 AND s.active = 1`
		),
		pool.query(
			`SELECT p.id, p.display_name, p.employee_no, p.employment_type, p.agency_name, p.contract_ends_on, p.shift_id, s.time_zone
			 FROM people p LEFT JOIN sites s ON s.id = p.site_id WHERE p.line_id = 1 AND p.active = 1${shiftCond}`
		),
		pool.query('SELECT id, code, name FROM shifts WHERE site_id = 1')
	]);
	await Promise.all([
		pool.query(
			`SELECT c.person_id, c.process_id, c.number, c.state, c.expires_at, c.grace_until, r.reminder_days
			 FROM certificates c JOIN certification_rules r ON r.id = c.rule_id WHERE c.person_id IN (${ids}${shiftCond})`
		),
		pool.query(
			`SELECT DISTINCT person_id, process_id FROM assignments WHERE person_id IN (${ids}${shiftCond}) AND closed_at IS NULL`
		),
		pool.query(
			`SELECT DISTINCT person_id, process_id FROM check_attempts WHERE person_id IN (${ids}${shiftCond})`
		),
		pool.query(
			`SELECT DISTINCT person_id, process_id FROM signoffs WHERE person_id IN (${ids}${shiftCond})`
		),
		pool.query(
			`SELECT r.id, r.person_id, r.station_id, r.ends_at, p.display_name FROM supervised_runs r
			 JOIN people p ON p.id = r.supervisor_id WHERE r.person_id IN (${ids}${shiftCond}) AND r.revoked_at IS NULL
			 AND r.starts_at <= NOW(3) AND r.ends_at > NOW(3)`
		)
	]);
}

const board = await readinessBoard({ lineId: 1, now: new Date() });
if (!board) throw new Error('bench line missing');
const cells = board.people.length * board.processes.length;
const rows: [string, number, number][] = [];
rows.push([
	`whole line: ${board.people.length} people × ${board.processes.length} processes`,
	await timeMedian(() => readinessBoard({ lineId: 1, now: new Date() }), RUNS),
	await timeMedian(() => floor(null), RUNS)
]);
rows.push([
	'one shift (A), with coverage for it',
	await timeMedian(() => readinessBoard({ lineId: 1, shiftId: 1, now: new Date() }), RUNS),
	await timeMedian(() => floor(1), RUNS)
]);
const csvMs = await timeMedian(async () => {
	const b = await readinessBoard({ lineId: 1, now: new Date() });
	readinessCsv(b!);
}, RUNS);

const f = (ms: number) => ms.toFixed(1);
console.log(
	`\nReadiness board, ${PEOPLE} people × ${PROCESSES} processes on ${STATIONS} stations (${cells.toLocaleString('en')} cells, ${board.coverage.length} coverage rows); data generated in ${(genMs / 1000).toFixed(1)} s; median of ${RUNS} runs\n`
);
console.log('| what | board ms | floor ms (bare SELECTs) | ratio board / floor |');
console.log('| --- | ---: | ---: | ---: |');
for (const [what, ms, fl] of rows)
	console.log(`| ${what} | ${f(ms)} | ${f(fl)} | ${(ms / fl).toFixed(1)}× |`);
console.log(`| whole line + CSV export | ${f(csvMs)} | | |`);
console.log(`\nper cell: ${((rows[0][1] * 1000) / cells).toFixed(1)} µs`);

await pool.end();
await scratch.close();
