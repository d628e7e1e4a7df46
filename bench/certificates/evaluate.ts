// Certification evaluation at plant scale: 2,000 people × 30 processes, every person certified on
// every process (60,000 certificates on 60,000 acknowledgements). Then a revision that needs
// retraining becomes effective on one instruction and the lifecycle job moves the certificates
// resting on the older revision. Timed: the whole-plant evaluation (evaluatePeople), the lifecycle
// run, and the re-evaluation of the people it touched, each beside a floor measured in the same
// run: the bare SQL that reads the same rows (acknowledgements joined to effective revisions; the
// certificates to move) with no application logic. Data lives in a scratch database on the dev
// MariaDB, dropped at the end. Usage: npm run bench:certificates:evaluate
import { openScratch, timeMedian } from '../lib/scratch';

const PEOPLE = 2000;
const PROCESSES = 30;
const RUNS = 5;
const SCRATCH = 'padbridge_scratch_eval';
const DAY = 86_400_000;

const scratch = await openScratch(SCRATCH);
const scratchUrl = scratch.url;
const conn = scratch.conn;

const now = Date.now();
const at = (daysFromNow: number) => new Date(now + daysFromNow * DAY);
console.log(`generating ${PEOPLE} people × ${PROCESSES} processes in ${SCRATCH} …`);
const t0 = performance.now();
await conn.query(
	"INSERT INTO sites (id, code, name, time_zone) VALUES (1, 'KBO-2', 'Bench plant', 'Asia/Ho_Chi_Minh')"
);
await conn.query(
	`INSERT INTO people (id, employee_no, display_name, locale, employment_type, site_id, active, session_version, created_at, updated_at)
	 SELECT seq, CONCAT('B-', seq), CONCAT('Bench person ', seq), 'en', 'employee', 1, 1, 1, NOW(3), NOW(3) FROM seq_1_to_${PEOPLE}`
);
await conn.query(
	`INSERT INTO processes (id, code, name, bond_type, active)
	 SELECT seq, CONCAT('P', seq), CONCAT('Bench process ', seq), 'COG', 1 FROM seq_1_to_${PROCESSES}`
);
await conn.query(
	`INSERT INTO instructions (id, doc_number, title, process_id, owner_id, created_at)
	 SELECT seq, CONCAT('WI-B', seq, '-001'), CONCAT('Bench instruction ', seq), seq, 1, NOW(3) FROM seq_1_to_${PROCESSES}`
);
// Rev A of every instruction, effective 200 days ago; rev B of instruction 1 needs retraining and
// becomes effective "now" (a second from now, so the first evaluation sees A in force).
await conn.query(
	`INSERT INTO revisions (id, instruction_id, letter, state, source, content_hash, classification, author_id, created_at, updated_at, approved_at, approved_by, effective_from, version)
	 SELECT seq, seq, 'A', 'approved', 'text', REPEAT('0', 64), 'retraining', 1, NOW(3), NOW(3), NOW(3), 1, ?, 1 FROM seq_1_to_${PROCESSES}`,
	[at(-200)]
);
const switchAt = new Date(now + 1000);
await conn.query(
	`INSERT INTO revisions (id, instruction_id, letter, state, source, content_hash, classification, author_id, created_at, updated_at, approved_at, approved_by, effective_from, version)
	 VALUES (${PROCESSES + 1}, 1, 'B', 'approved', 'text B', REPEAT('1', 64), 'retraining', 1, NOW(3), NOW(3), NOW(3), 1, ?, 1)`,
	[switchAt]
);
await conn.query(
	`INSERT INTO certification_rules (id, process_id, version, pass_mark_pct, practical_required, validity_months, grace_days, reminder_days, show_full_name_on_verify, created_by, created_at, active_from)
	 SELECT seq, seq, 1, 80, 0, 12, 14, '[30,7]', 0, 1, NOW(3), ? FROM seq_1_to_${PROCESSES}`,
	[at(-300)]
);
await conn.query(
	`INSERT INTO rule_instructions (rule_id, instruction_id) SELECT seq, seq FROM seq_1_to_${PROCESSES}`
);
await conn.query(
	`INSERT INTO acknowledgements (person_id, revision_id, method, content_hash, acknowledged_at)
	 SELECT p.seq, r.seq, 'pin', REPEAT('0', 64), ? FROM seq_1_to_${PEOPLE} p JOIN seq_1_to_${PROCESSES} r`,
	[at(-100)]
);
await conn.query(
	`INSERT INTO certificates (id, number, person_id, process_id, rule_id, state, issued_at, expires_at, signer_name, signer_role, verify_token_hash)
	 SELECT (p.seq - 1) * ${PROCESSES} + r.seq, CONCAT('KBO2-B-', p.seq, '-', r.seq), p.seq, r.seq, r.seq, 'active', ?, ?, 'Bench', 'Quality', SHA2(CONCAT(p.seq, '-', r.seq), 256)
	 FROM seq_1_to_${PEOPLE} p JOIN seq_1_to_${PROCESSES} r`,
	[at(-99), at(266)]
);
await conn.query(
	`INSERT INTO certificate_basis (certificate_id, kind, ref_id, revision_id)
	 SELECT c.id, 'acknowledgement', a.id, a.revision_id FROM certificates c
	 JOIN acknowledgements a ON a.person_id = c.person_id AND a.revision_id = c.process_id`
);
const genMs = performance.now() - t0;

process.env.DATABASE_URL = scratchUrl;
const { evaluatePeople } = await import('../../src/lib/server/certificates/evaluate');
const { runCertificateLifecycle } = await import('../../src/lib/server/certificates/lifecycle');
const { pool } = await import('../../src/lib/server/db/index');

const personIds = Array.from({ length: PEOPLE }, (_, i) => i + 1);
const time = (fn: () => Promise<unknown>, runs = RUNS) => timeMedian(fn, runs);

const before = new Date(switchAt.getTime() - 1);
let cells = 0;
const evalMs = await time(async () => {
	cells = (await evaluatePeople(personIds, null, before)).length;
});
// Floor: the rows evaluation has to read, straight from SQL (acknowledgements of the revisions in
// force, certificates with their rule), no status derivation, no grouping in JavaScript.
const evalFloorMs = await time(async () => {
	await conn.query(
		`SELECT a.person_id, r.instruction_id FROM acknowledgements a JOIN revisions r ON r.id = a.revision_id WHERE r.letter = 'A'`
	);
	await conn.query(
		'SELECT c.person_id, c.process_id, c.state, c.expires_at, cr.reminder_days FROM certificates c JOIN certification_rules cr ON cr.id = c.rule_id'
	);
});

// The switch: rev B of instruction 1 is now in force. Floor: the SELECT that finds the same
// certificates, no updates and no audit rows.
await new Promise((r) => setTimeout(r, Math.max(0, switchAt.getTime() - Date.now() + 5)));
const moveFloorStart = performance.now();
const [found] = await conn.query(
	`SELECT c.id FROM certificates c JOIN certificate_basis b ON b.certificate_id = c.id AND b.kind = 'acknowledgement'
	 JOIN revisions o ON o.id = b.revision_id JOIN revisions n ON n.instruction_id = o.instruction_id
	   AND n.classification = 'retraining' AND n.effective_from <= NOW(3) AND n.effective_from > o.effective_from
	 WHERE c.state = 'active'`
);
const moveFloorMs = performance.now() - moveFloorStart;
const lifeStart = performance.now();
const moved = await runCertificateLifecycle(new Date());
const lifeMs = performance.now() - lifeStart;
const second = performance.now();
const again = await runCertificateLifecycle(new Date());
const idleMs = performance.now() - second;
let touched = 0;
const reevalMs = await time(async () => {
	touched = (await evaluatePeople(personIds, [1], new Date())).filter(
		(e) => e.certificate?.status === 'retraining_due'
	).length;
});
if (moved.retrainingDue !== PEOPLE || touched !== PEOPLE || (found as unknown[]).length !== PEOPLE)
	throw new Error(
		`expected ${PEOPLE} certificates moved, got ${moved.retrainingDue} (found ${(found as unknown[]).length}, evaluated ${touched})`
	);

const f = (n: number) => n.toFixed(0);
console.log(
	`\nCertification evaluation, ${PEOPLE} people × ${PROCESSES} processes (${cells.toLocaleString('en')} person × process cells); data generated in ${(genMs / 1000).toFixed(1)} s; median of ${RUNS} runs\n`
);
console.log('| step | Padbridge ms | floor ms | ratio | floor |');
console.log('|---|---:|---:|---:|---|');
console.log(
	`| evaluate the whole plant (evaluatePeople) | ${f(evalMs)} | ${f(evalFloorMs)} | ${(evalMs / evalFloorMs).toFixed(1)}× | the two SELECTs of the same rows |`
);
console.log(
	`| lifecycle after rev B became effective: ${moved.retrainingDue} certificates → retraining due, each audited | ${f(lifeMs)} | ${f(moveFloorMs)} | ${(lifeMs / moveFloorMs).toFixed(1)}× | the SELECT finding them, no writes |`
);
console.log(
	`| lifecycle run again (nothing to do: ${again.retrainingDue} moved) | ${f(idleMs)} | | | |`
);
console.log(`| re-evaluate the affected process for all ${PEOPLE} people | ${f(reevalMs)} | | | |`);
console.log(
	`\nper moved certificate: ${(lifeMs / moved.retrainingDue).toFixed(2)} ms (update + hash-chained audit row); per evaluated cell: ${((evalMs * 1000) / cells).toFixed(1)} µs`
);

await pool.end();
await scratch.close();
