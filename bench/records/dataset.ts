// 100,000 training-record rows in a scratch database, made with bulk INSERT … SELECT over
// MariaDB's SEQUENCE engine (seq_1_to_N). Shared by the records benchmark and the bounded-memory
// integration test (tests/integration/records-memory.test.ts).
//
// Shape: PEOPLE people on two lines (names with Vietnamese and Chinese characters); 10 processes,
// each with a rule listing two instructions (one effective revision each), a knowledge check and
// a checklist. Processes 1–9: every person holds a certificate (states vary) issued on both
// acknowledgements, a passed attempt and a sign-off → 2 rows each. Process 10: everyone is only
// assigned → 2 rows each ("not started"). Rows = PEOPLE × (9 × 2 + 2) = 20 × PEOPLE.
import type { Connection } from 'mysql2/promise';
import { hashSecret } from '../../src/lib/server/auth/password';

export const ROWS_PER_PERSON = 20;
export const BENCH_HR_EMAIL = 'bench.hr@kbo2.example';
export const BENCH_HR_PASSWORD = 'bench-records-password-2026';

const DAY = 86_400_000;

export async function fillRecordsDataset(conn: Connection, people: number): Promise<number> {
	const now = Date.now();
	const at = (days: number) => new Date(now + days * DAY);
	const q = (sql: string, params: unknown[] = []) => conn.query(sql, params);
	const hr = people + 1;
	const trainer = people + 2;

	await q(
		"INSERT INTO sites (id, code, name, time_zone) VALUES (1, 'KBO-2', 'Bench plant', 'Asia/Ho_Chi_Minh')"
	);
	await q(
		"INSERT INTO `lines` (id, site_id, code, name, active) VALUES (1, 1, 'L1', 'Line 1 · COG', 1), (2, 1, 'L2', 'Line 2 · FOG', 1)"
	);
	await q(
		`INSERT INTO people (id, employee_no, display_name, locale, employment_type, agency_name, site_id,
		   line_id, active, session_version, created_at, updated_at)
		 SELECT seq, CONCAT('B-', LPAD(seq, 6, '0')),
		   CONCAT(ELT(1 + seq % 4, 'Nguyễn Thị ', 'Trần Văn ', '王', 'Lê Hoàng '), seq),
		   'en', IF(seq % 10 = 0, 'agency', 'employee'), IF(seq % 10 = 0, 'Mekong Staffing', NULL),
		   1, 1 + seq % 2, 1, 1, NOW(3), NOW(3) FROM seq_1_to_${people}`
	);
	await q(
		`INSERT INTO people (id, employee_no, display_name, email, locale, employment_type, site_id, active,
		   password_hash, session_version, created_at, updated_at)
		 VALUES (?, 'B-HR', 'Bench HR', ?, 'en', 'employee', 1, 1, ?, 1, NOW(3), NOW(3)),
		        (?, 'B-TR', 'Bench trainer 陈', NULL, 'en', 'employee', 1, 1, NULL, 1, NOW(3), NOW(3))`,
		[hr, BENCH_HR_EMAIL, await hashSecret(BENCH_HR_PASSWORD), trainer]
	);
	await q(
		`INSERT INTO role_assignments (person_id, role, granted_at) VALUES (?, 'hr', NOW(3)), (?, 'trainer', NOW(3))`,
		[hr, trainer]
	);
	await q(
		`INSERT INTO processes (id, code, name, bond_type, active)
		 SELECT seq, CONCAT('BP', LPAD(seq, 2, '0')), CONCAT('Bench process ', seq), 'COG', 1 FROM seq_1_to_10`
	);
	await q(
		`INSERT INTO instructions (id, doc_number, title, process_id, owner_id, created_at)
		 SELECT seq, CONCAT('WI-BN-', LPAD(seq, 3, '0')), CONCAT('Bench instruction ', seq), (seq + 1) DIV 2, ?, NOW(3)
		 FROM seq_1_to_20`,
		[trainer]
	);
	await q(
		`INSERT INTO revisions (id, instruction_id, letter, state, source, content_hash, classification,
		   author_id, created_at, updated_at, approved_at, approved_by, effective_from, version)
		 SELECT seq, seq, 'A', 'approved', '# bench', REPEAT('0', 64), 'acknowledge', ?, NOW(3), NOW(3), NOW(3), ?, ?, 1
		 FROM seq_1_to_20`,
		[trainer, trainer, at(-400)]
	);
	await q(
		`INSERT INTO knowledge_checks (id, code, title, process_id, owner_id, created_at)
		 SELECT seq, CONCAT('KC-BN-', seq), CONCAT('Bench check ', seq), seq, ?, NOW(3) FROM seq_1_to_10`,
		[trainer]
	);
	await q(
		`INSERT INTO check_versions (id, check_id, version, state, questions_per_attempt, attempts_before_cooldown,
		   cooldown_min, author_id, created_at, updated_at, approved_at)
		 SELECT seq, seq, 1, 'approved', 1, 1, 60, ?, NOW(3), NOW(3), NOW(3) FROM seq_1_to_10`,
		[trainer]
	);
	await q(
		`INSERT INTO checklists (id, process_id, revision_id, title, created_by, created_at)
		 SELECT seq, seq, 2 * seq - 1, CONCAT('Bench checklist ', seq), ?, NOW(3) FROM seq_1_to_10`,
		[trainer]
	);
	await q(
		`INSERT INTO certification_rules (id, process_id, version, check_id, pass_mark_pct, practical_required,
		   checklist_id, validity_months, grace_days, reminder_days, show_full_name_on_verify, created_by,
		   created_at, active_from)
		 SELECT seq, seq, 1, seq, 80, 1, seq, 12, 14, '[30,7]', 0, ?, NOW(3), ? FROM seq_1_to_10`,
		[trainer, at(-450)]
	);
	await q(
		`INSERT INTO rule_instructions (rule_id, instruction_id)
		 SELECT (seq + 1) DIV 2, seq FROM seq_1_to_20`
	);
	// Processes 1–9: acknowledgements of both instructions, a passed attempt, a sign-off, a certificate.
	await q(
		`INSERT INTO acknowledgements (id, person_id, revision_id, method, content_hash, acknowledged_at)
		 SELECT (p.seq - 1) * 18 + r.seq, p.seq, r.seq, 'pin', REPEAT('0', 64), ?
		 FROM seq_1_to_${people} p JOIN seq_1_to_18 r`,
		[at(-60)]
	);
	await q(
		`INSERT INTO check_attempts (id, person_id, check_version_id, process_id, pass_mark_pct, state,
		   started_at, submitted_at, score_pct, passed)
		 SELECT (p.seq - 1) * 9 + k.seq, p.seq, k.seq, k.seq, 80, 'submitted', ?, ?, 80 + (p.seq + k.seq) % 21, 1
		 FROM seq_1_to_${people} p JOIN seq_1_to_9 k`,
		[at(-59), at(-59)]
	);
	await q(
		`INSERT INTO signoffs (id, person_id, checklist_id, process_id, revision_id, trainer_id, state, passed,
		   content_hash, created_at, trainer_signed_at, operator_signed_at)
		 SELECT (p.seq - 1) * 9 + k.seq, p.seq, k.seq, k.seq, 2 * k.seq - 1, ?, 'countersigned', 1,
		   REPEAT('0', 64), ?, ?, ?
		 FROM seq_1_to_${people} p JOIN seq_1_to_9 k`,
		[trainer, at(-58), at(-58), at(-58)]
	);
	await q(
		`INSERT INTO certificates (id, number, person_id, process_id, rule_id, state, issued_at, expires_at,
		   signer_name, signer_role, verify_token_hash, grace_until)
		 SELECT (p.seq - 1) * 9 + k.seq, CONCAT('KBO2-BN', k.seq, '-2026-', LPAD((p.seq - 1) * 9 + k.seq, 6, '0')),
		   p.seq, k.seq, k.seq,
		   ELT(1 + (p.seq + k.seq) % 10, 'active','active','active','active','active','active','retraining_due','expired','suspended','superseded'),
		   ?, DATE_ADD(?, INTERVAL CAST((p.seq * 7 + k.seq * 13) % 400 AS SIGNED) - 20 DAY), 'Bench signer', 'Quality',
		   SHA2(CONCAT(p.seq, '-', k.seq), 256), DATE_ADD(?, INTERVAL CAST((p.seq + k.seq) % 20 AS SIGNED) - 5 DAY)
		 FROM seq_1_to_${people} p JOIN seq_1_to_9 k`,
		[at(-57), new Date(now), new Date(now)]
	);
	await q(
		`INSERT INTO certificate_basis (certificate_id, kind, ref_id, revision_id)
		 SELECT (p.seq - 1) * 9 + k.seq, 'acknowledgement', (p.seq - 1) * 18 + 2 * k.seq - 1 + j.seq, 2 * k.seq - 1 + j.seq
		 FROM seq_1_to_${people} p JOIN seq_1_to_9 k JOIN seq_0_to_1 j`
	);
	await q(
		`INSERT INTO certificate_basis (certificate_id, kind, ref_id, revision_id)
		 SELECT (p.seq - 1) * 9 + k.seq, 'attempt', (p.seq - 1) * 9 + k.seq, NULL
		 FROM seq_1_to_${people} p JOIN seq_1_to_9 k`
	);
	await q(
		`INSERT INTO certificate_basis (certificate_id, kind, ref_id, revision_id)
		 SELECT (p.seq - 1) * 9 + k.seq, 'signoff', (p.seq - 1) * 9 + k.seq, 2 * k.seq - 1
		 FROM seq_1_to_${people} p JOIN seq_1_to_9 k`
	);
	// Process 10: assigned only.
	await q(
		`INSERT INTO assignments (person_id, process_id, scope, assigned_by, assigned_at)
		 SELECT seq, 10, 'person', ?, ? FROM seq_1_to_${people}`,
		[trainer, at(-10)]
	);
	// Fresh statistics, as a table that grew over years would have: without them the optimiser may
	// pick a single-column index for the per-person lookups of the export.
	await q(
		'ANALYZE TABLE people, certificates, certificate_basis, acknowledgements, check_attempts, signoffs, assignments'
	);
	return people * ROWS_PER_PERSON;
}
