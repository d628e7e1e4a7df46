// Training histories against the real MariaDB and the built server: the PDF read back with
// pdftotext (every record with its dates, signers and revisions, the plant, the generated-on
// stamp, page x of y on every page of a long history), one render OCR'd for a Vietnamese + Chinese
// name, the JSON of "My records" compared field by field with the database and free of anyone
// else's data, the audit events of the downloads, and who may fetch what.
//
// Expected local times are written out by hand: Asia/Ho_Chi_Minh is UTC+7 all year with no
// daylight saving time (IANA time zone database), so 01:05 UTC is 08:05 in the plant.
import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import path from 'node:path';
import type { ResultSetHeader } from 'mysql2/promise';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { db, pool } from '../../src/lib/server/db';
import { changeCertificateState } from '../../src/lib/server/certificates/register';
import { insertSignature } from '../../src/lib/server/instructions/signatures';
import { NAME_BOX_PT, renderHistoryPdf } from '../../src/lib/server/records/history-pdf';
import { trainingHistory } from '../../src/lib/server/records/history';
import { ROLES } from '../../src/lib/roles';
import {
	appDb,
	closeDbHelpers,
	createTestPerson,
	demoPersonId,
	queryRows,
	retireTestPeople,
	type TestPerson
} from '../helpers/db';
import {
	acknowledge,
	completedSignoff,
	insertCertificate,
	makeCheck,
	makeChecklist,
	makeInstructionRows,
	makeProcess,
	submittedAttempt
} from '../helpers/training-fixtures';
import { insertTestRule } from '../helpers/certificate-fixtures';
import { fontRows, ocrLine, readPdfPages, renderBox } from '../helpers/pdf-readback';
import {
	newClient,
	signInAsDemo,
	signInWithPassword,
	type HttpClient
} from '../helpers/http-session';

const NAME = 'Lương Thị Kim Ngân / 李娜';
const SUSPEND_REASON = 'Peel test failures on lot 2604-17';
const utc = (iso: string) => new Date(iso);

let dir: string;
let person: TestPerson;
let other: TestPerson;
let busy: TestPerson;
let trainer: TestPerson;
let hr: HttpClient;
let plantName: string;
const f = {} as {
	docNumber: string;
	revA: number;
	revB: number;
	checkCode: string;
	checklistTitle: string;
	ackA: number;
	ackB: number;
	failedAttempt: number;
	passedAttempt: number;
	signoff: number;
	suspended: { id: number; number: string };
	expired: { id: number; number: string };
	assignment: number;
	otherAck: number;
	otherCertificate: string;
};

async function insertRow(sql: string, params: unknown[]): Promise<number> {
	const [res] = await appDb().query<ResultSetHeader>(sql, params);
	return res.insertId;
}

async function certificateNumber(id: number) {
	const [c] = await queryRows<{ number: string }>(
		appDb(),
		'SELECT number FROM certificates WHERE id = ?',
		[id]
	);
	return c.number;
}

beforeAll(async () => {
	dir = await mkdtemp(path.join(tmpdir(), 'padbridge-history-'));
	trainer = await createTestPerson({ roles: ['trainer'], displayName: 'Hồ Văn Kiên (trainer)' });
	person = await createTestPerson({ roles: ['operator'], displayName: NAME, line: 'L1' });
	other = await createTestPerson({ roles: ['operator'], displayName: 'Someone Else Entirely' });
	busy = await createTestPerson({ roles: ['operator'], displayName: 'Phùng Văn Bận (many)' });
	const [site] = await queryRows<{ name: string }>(
		appDb(),
		"SELECT name FROM sites WHERE code = 'KBO-2'"
	);
	plantName = site.name;
	const qualityId = await demoPersonId('quality@kbo2.example');

	const proc = await makeProcess();
	const ins = await makeInstructionRows(trainer.id, proc.id, [
		{ letter: 'A', effectiveFrom: utc('2026-01-05T00:00:00Z') },
		{ letter: 'B', effectiveFrom: utc('2026-03-30T00:00:00Z') }
	]);
	f.docNumber = ins.docNumber;
	[f.revA, f.revB] = ins.revisionIds;
	f.ackA = await acknowledge(person.id, f.revA, utc('2026-03-10T01:05:00Z'));
	f.ackB = await acknowledge(person.id, f.revB, utc('2026-04-02T09:30:00Z'));
	const check = await makeCheck(proc.id, trainer.id);
	f.checkCode = check.code;
	f.failedAttempt = await submittedAttempt(
		person.id,
		check,
		proc.id,
		false,
		utc('2026-03-11T02:00:00Z')
	);
	f.passedAttempt = await submittedAttempt(
		person.id,
		check,
		proc.id,
		true,
		utc('2026-03-12T03:15:00Z')
	);
	const checklistId = await makeChecklist(proc.id, f.revB, trainer.id);
	[{ title: f.checklistTitle }] = await queryRows<{ title: string }>(
		appDb(),
		'SELECT title FROM checklists WHERE id = ?',
		[checklistId]
	);
	f.signoff = await completedSignoff(
		person.id,
		trainer.id,
		checklistId,
		proc.id,
		f.revB,
		true,
		utc('2026-04-03T04:20:00Z')
	);
	// The trainer's signature as signed: its printed name and time are what the history shows.
	await db.transaction((tx) =>
		insertSignature(tx, {
			recordType: 'signoff',
			recordId: f.signoff,
			signerId: trainer.id,
			printedName: 'Hồ Văn Kiên',
			meaning: 'observed',
			contentHash: '0'.repeat(64),
			signedAt: utc('2026-04-03T04:21:00Z')
		})
	);

	const ruleId = await insertTestRule(proc.id, trainer.id);
	const suspendedId = await insertCertificate(person.id, proc.id, ruleId, {
		issuedAt: utc('2026-03-12T04:00:00Z'),
		expiresAt: utc('2027-03-12T17:00:00Z')
	});
	for (const [kind, ref, rev] of [
		['acknowledgement', f.ackB, f.revB],
		['attempt', f.passedAttempt, null],
		['signoff', f.signoff, f.revB]
	] as const) {
		await insertRow(
			'INSERT INTO certificate_basis (certificate_id, kind, ref_id, revision_id) VALUES (?, ?, ?, ?)',
			[suspendedId, kind, ref, rev]
		);
	}
	await changeCertificateState(
		{ id: qualityId, label: 'Nguyễn Thị Minh Châu', address: '127.0.0.1' },
		suspendedId,
		'suspend',
		SUSPEND_REASON
	);
	f.suspended = { id: suspendedId, number: await certificateNumber(suspendedId) };
	const expiredId = await insertCertificate(person.id, proc.id, ruleId, {
		state: 'expired',
		issuedAt: utc('2025-01-02T03:00:00Z'),
		expiresAt: utc('2026-01-02T17:00:00Z')
	});
	f.expired = { id: expiredId, number: await certificateNumber(expiredId) };
	f.assignment = await insertRow(
		`INSERT INTO assignments (person_id, process_id, scope, due_on, assigned_by, assigned_at)
		 VALUES (?, ?, 'person', '2026-04-30', ?, ?)`,
		[person.id, proc.id, trainer.id, utc('2026-03-01T02:00:00Z')]
	);

	// Someone else's records on the same instruction and process: never in the first person's file.
	f.otherAck = await acknowledge(other.id, f.revA, utc('2026-03-10T02:00:00Z'));
	f.otherCertificate = await certificateNumber(
		await insertCertificate(other.id, proc.id, ruleId, {})
	);

	// A long history: 45 acknowledgements over three instructions and 30 attempts.
	for (let i = 0; i < 3; i++) {
		const letters = Array.from({ length: 15 }, (_, k) => String.fromCharCode(65 + k));
		const long = await makeInstructionRows(
			trainer.id,
			proc.id,
			letters.map((letter, k) => ({
				letter,
				effectiveFrom: utc(`2025-0${1 + i}-${10 + k}T00:00:00Z`)
			}))
		);
		for (const [k, rev] of long.revisionIds.entries())
			await acknowledge(busy.id, rev, utc(`2025-0${1 + i}-${10 + k}T05:00:00Z`));
	}
	for (let k = 0; k < 30; k++)
		await submittedAttempt(
			busy.id,
			check,
			proc.id,
			k % 3 === 0,
			utc(`2025-06-${10 + (k % 19)}T0${k % 9}:30:00Z`)
		);

	hr = await signInAsDemo('hr');
});

afterAll(async () => {
	await retireTestPeople();
	await closeDbHelpers();
	await pool.end();
	await rm(dir, { recursive: true, force: true });
});

async function download(client: HttpClient, url: string) {
	const res = await client.get(url, { headers: { accept: '*/*' } });
	expect(res.status, `${url}: ${res.status}`).toBe(200);
	return res;
}

async function latestExportEvent(actorId: number | null, personId: number) {
	const rows = await queryRows<{ actor_id: number | null; new_values: unknown }>(
		appDb(),
		`SELECT actor_id, new_values FROM audit_events
		 WHERE action = 'records.history_exported' AND entity_type = 'person' AND entity_id = ?
		 ORDER BY seq DESC LIMIT 1`,
		[String(personId)]
	);
	const row = rows[0];
	if (actorId !== null) expect(row.actor_id).toBe(actorId);
	return typeof row.new_values === 'string' ? JSON.parse(row.new_values) : row.new_values;
}

describe('training history PDF', () => {
	it('lists every acknowledgement, attempt, sign-off and certificate with dates, signers and revisions', async () => {
		const res = await download(hr, `/records/people/${person.id}/history.pdf`);
		expect(res.headers.get('content-type')).toBe('application/pdf');
		expect(res.headers.get('content-disposition')).toMatch(
			new RegExp(
				`^attachment; filename="training-history-${person.employeeNo}-\\d{4}-\\d{2}-\\d{2}\\.pdf"$`
			)
		);
		const pdf = await readPdfPages(new Uint8Array(await res.arrayBuffer()), dir, 'person');
		const text = pdf.flat.join(' ');

		// Header and stamp.
		expect(text).toContain(plantName);
		expect(text).toContain(NAME);
		expect(text).toContain(`Employee no. ${person.employeeNo}`);
		expect(text).toMatch(
			/Generated on \d{4}-\d{2}-\d{2} \d{2}:\d{2} GMT\+7 \(Asia\/Ho_Chi_Minh\) by Sofía Herrera/
		);
		pdf.flat.forEach((page, i) => expect(page).toContain(`Page ${i + 1} of ${pdf.pageCount}`));

		// Acknowledgements: instruction, revision, plant time, signing method.
		expect(text).toContain('Acknowledgements (2)');
		expect(text).toMatch(
			new RegExp(`${f.docNumber} Fixture ${f.docNumber} rev A 2026-03-10 08:05 PIN`)
		);
		expect(text).toMatch(
			new RegExp(`${f.docNumber} Fixture ${f.docNumber} rev B 2026-04-02 16:30 PIN`)
		);
		// Attempts: check, version, started, submitted, score against the pass mark, result.
		expect(text).toContain('Knowledge-check attempts (2)');
		expect(text).toContain(`v1 2026-03-11 08:50 2026-03-11 09:00 40 % / 80 % Failed`);
		expect(text).toContain(`v1 2026-03-12 10:05 2026-03-12 10:15 100 % / 80 % Passed`);
		expect(text).toContain(f.checkCode);
		// Sign-off: checklist, revision, the trainer's signature as signed, the operator's countersign.
		expect(text).toContain('Practical sign-offs (1)');
		expect(text).toContain(
			`${f.checklistTitle} ${f.docNumber} rev B Hồ Văn Kiên 2026-04-03 11:21 ${NAME} 2026-04-03 11:20 Passed`
		);
		// Certificates: number, issue and expiry, status, basis revisions, the suspension and its reason.
		expect(text).toContain('Certificates (2)');
		expect(text).toContain(`${f.suspended.number}`);
		expect(text).toContain('2026-03-12 11:00 2027-03-13 00:00 Suspended');
		expect(text).toContain(
			`Basis: acknowledgement: ${f.docNumber} rev B; attempt #${f.passedAttempt}; signoff: ${f.docNumber} rev B`
		);
		expect(text).toMatch(
			new RegExp(
				`Suspended \\d{4}-\\d{2}-\\d{2} \\d{2}:\\d{2} by Nguyễn Thị Minh Châu — ${SUSPEND_REASON}`
			)
		);
		expect(text).toContain(`${f.expired.number}`);
		expect(text).toContain('2025-01-02 10:00 2026-01-03 00:00 Expired');
		// Assignment: process, due date, who assigned it and when.
		expect(text).toContain('Assignments (1)');
		expect(text).toContain(`person 2026-04-30 2026-03-01 09:00 by Hồ Văn Kiên (trainer) open`);

		// Nobody else's records.
		expect(text).not.toContain(f.otherCertificate);
		expect(text).not.toContain('Someone Else Entirely');

		// Every font is embedded, the CJK one among them.
		const fonts = fontRows(pdf.fonts);
		for (const row of fonts) expect(row, row.name).toMatchObject({ embedded: true });
		expect(fonts.some((r) => r.name.includes('NotoSansSC'))).toBe(true);

		// The name renders: read from the pixels of page 1, not from the text layer.
		const png = await renderBox(pdf.pdfPath, 1, NAME_BOX_PT, 150, path.join(dir, 'person-name'));
		expect(await ocrLine(png, 'vie+chi_sim')).toBe(NAME);

		const hrId = await demoPersonId('hr@kbo2.example');
		expect(await latestExportEvent(hrId, person.id)).toEqual({
			format: 'pdf',
			self: false,
			employeeNo: person.employeeNo,
			rows: { assignments: 1, acknowledgements: 2, attempts: 2, signoffs: 1, certificates: 2 }
		});
	});

	it('paginates a long history with the header and page x of y on every page', async () => {
		const res = await download(hr, `/records/people/${busy.id}/history.pdf`);
		const pdf = await readPdfPages(new Uint8Array(await res.arrayBuffer()), dir, 'busy');
		expect(pdf.pageCount).toBeGreaterThanOrEqual(3);
		expect(pdf.pages).toHaveLength(pdf.pageCount);
		pdf.flat.forEach((page, i) => {
			expect(page).toContain(`Page ${i + 1} of ${pdf.pageCount}`);
			expect(page).toContain('Phùng Văn Bận (many)');
			expect(page).toContain(`Employee no. ${busy.employeeNo}`);
			expect(page).toContain(plantName);
			expect(page).toContain('Generated on');
		});
		const text = pdf.flat.join(' ');
		expect(text).toContain('Acknowledgements (45)');
		expect(text).toContain('Acknowledgements (continued)');
		expect(text).toContain('Knowledge-check attempts (30)');
		// All 45 acknowledgements are there, each once, across the pages.
		expect(text.match(/ rev [A-O] 2025-0[1-3]-\d{2} 12:00 PIN/g)).toHaveLength(45);
		expect(text.match(/ (Passed|Failed)/g)).toHaveLength(30);
	});

	it('prints Hangul with the Korean font (names such as 김민준 in the demo plant)', async () => {
		const h = (await trainingHistory(person.id))!;
		const bytes = await renderHistoryPdf(
			{ ...h, person: { ...h.person, displayName: '김민준' } },
			{ generatedBy: '박서연' }
		);
		const pdf = await readPdfPages(bytes, dir, 'hangul');
		expect(pdf.flat[0]).toContain('김민준');
		expect(pdf.flat[0]).toContain('by 박서연');
		const fonts = fontRows(pdf.fonts);
		expect(fonts.some((r) => r.name.includes('NotoSansKR'))).toBe(true);
		for (const row of fonts) expect(row, row.name).toMatchObject({ embedded: true });
	});

	it('is 404 for a person who does not exist', async () => {
		const res = await hr.get('/records/people/999999999/history.pdf');
		expect(res.status).toBe(404);
	});
});

/** The rows of the database the JSON must equal, read with SQL of the test's own. */
async function databaseRecords(personId: number) {
	const iso = (d: Date | null) => (d ? new Date(d).toISOString() : null);
	const acks = await queryRows<{ id: number; doc_number: string; letter: string; at: Date }>(
		appDb(),
		`SELECT a.id, i.doc_number, r.letter, a.acknowledged_at AS at FROM acknowledgements a
		 JOIN revisions r ON r.id = a.revision_id JOIN instructions i ON i.id = r.instruction_id
		 WHERE a.person_id = ? ORDER BY a.acknowledged_at, a.id`,
		[personId]
	);
	const attempts = await queryRows<{
		id: number;
		code: string;
		version: number;
		submitted_at: Date | null;
		score_pct: string | null;
		passed: number | null;
	}>(
		appDb(),
		`SELECT t.id, k.code, v.version, t.submitted_at, t.score_pct, t.passed FROM check_attempts t
		 JOIN check_versions v ON v.id = t.check_version_id JOIN knowledge_checks k ON k.id = v.check_id
		 WHERE t.person_id = ? ORDER BY t.started_at, t.id`,
		[personId]
	);
	const signoffs = await queryRows<{ id: number; state: string; operator_signed_at: Date }>(
		appDb(),
		'SELECT id, state, operator_signed_at FROM signoffs WHERE person_id = ? ORDER BY created_at, id',
		[personId]
	);
	const certificates = await queryRows<{
		number: string;
		state: string;
		issued_at: Date;
		expires_at: Date;
	}>(
		appDb(),
		'SELECT number, state, issued_at, expires_at FROM certificates WHERE person_id = ? ORDER BY issued_at, id',
		[personId]
	);
	const assignments = await queryRows<{ id: number; due_on: string }>(
		appDb(),
		"SELECT id, DATE_FORMAT(due_on, '%Y-%m-%d') AS due_on FROM assignments WHERE person_id = ? ORDER BY assigned_at, id",
		[personId]
	);
	return {
		acknowledgements: acks.map((a) => ({
			id: a.id,
			docNumber: a.doc_number,
			revision: a.letter,
			acknowledgedAt: iso(a.at)
		})),
		knowledgeCheckAttempts: attempts.map((a) => ({
			id: a.id,
			checkCode: a.code,
			checkVersion: a.version,
			submittedAt: iso(a.submitted_at),
			scorePct: a.score_pct == null ? null : Number(a.score_pct),
			passed: a.passed == null ? null : a.passed === 1
		})),
		practicalSignoffs: signoffs.map((s) => ({
			id: s.id,
			state: s.state,
			operatorSignedAt: iso(s.operator_signed_at)
		})),
		certificates: certificates.map((c) => ({
			number: c.number,
			state: c.state,
			issuedAt: iso(c.issued_at),
			expiresAt: iso(c.expires_at)
		})),
		assignments: assignments.map((a) => ({ id: a.id, dueOn: a.due_on }))
	};
}

type Json = Record<string, unknown> & {
	person: Record<string, unknown>;
	acknowledgements: Record<string, unknown>[];
	knowledgeCheckAttempts: Record<string, unknown>[];
	practicalSignoffs: (Record<string, unknown> & { trainer: { name: string; signedAt: string } })[];
	certificates: (Record<string, unknown> & { events: Record<string, unknown>[] })[];
	assignments: Record<string, unknown>[];
};

const pick = (rows: Record<string, unknown>[], keys: string[]) =>
	rows.map((r) => Object.fromEntries(keys.map((k) => [k, r[k]])));

describe('My records (JSON)', () => {
	let mine: Json;
	let self: HttpClient;

	beforeAll(async () => {
		self = await signInWithPassword(person.email!, person.password);
	});

	it('downloads the signed-in person’s own history as an attachment that equals the database', async () => {
		const res = await download(self, '/my-records.json');
		expect(res.headers.get('content-type')).toBe('application/json; charset=utf-8');
		expect(res.headers.get('content-disposition')).toMatch(
			new RegExp(
				`^attachment; filename="training-history-${person.employeeNo}-\\d{4}-\\d{2}-\\d{2}\\.json"$`
			)
		);
		const text = await res.text();
		mine = JSON.parse(text);
		expect(mine).toMatchObject({
			format: 'padbridge.training-history',
			formatVersion: 1,
			generatedBy: NAME,
			timeZone: 'Asia/Ho_Chi_Minh',
			plant: { code: 'KBO-2', name: plantName },
			person: {
				id: person.id,
				employeeNo: person.employeeNo,
				displayName: NAME,
				email: person.email,
				badgeNo: person.badge,
				line: { code: 'L1' },
				active: true
			}
		});
		const rows = await databaseRecords(person.id);
		expect(pick(mine.acknowledgements, ['id', 'docNumber', 'revision', 'acknowledgedAt'])).toEqual(
			rows.acknowledgements
		);
		expect(
			pick(mine.knowledgeCheckAttempts, [
				'id',
				'checkCode',
				'checkVersion',
				'submittedAt',
				'scorePct',
				'passed'
			])
		).toEqual(rows.knowledgeCheckAttempts);
		expect(pick(mine.practicalSignoffs, ['id', 'state'])).toEqual(
			rows.practicalSignoffs.map(({ id, state }) => ({ id, state }))
		);
		expect(
			mine.practicalSignoffs.map((s) => (s.operator as { signedAt: string }).signedAt)
		).toEqual(rows.practicalSignoffs.map((s) => s.operatorSignedAt));
		expect(mine.practicalSignoffs[0].trainer).toEqual({
			name: 'Hồ Văn Kiên',
			signedAt: '2026-04-03T04:21:00.000Z'
		});
		expect(pick(mine.certificates, ['number', 'state', 'issuedAt', 'expiresAt'])).toEqual(
			rows.certificates
		);
		expect(pick(mine.assignments, ['id', 'dueOn'])).toEqual(rows.assignments);
		// The expected values by hand as well, so an empty database could not pass.
		expect(rows.acknowledgements.map((a) => a.acknowledgedAt)).toEqual([
			'2026-03-10T01:05:00.000Z',
			'2026-04-02T09:30:00.000Z'
		]);
		const suspended = mine.certificates.find((c) => c.number === f.suspended.number)!;
		expect(suspended.status).toBe('suspended');
		expect(suspended.events).toContainEqual(
			expect.objectContaining({
				kind: 'suspended',
				by: 'Nguyễn Thị Minh Châu',
				reason: SUSPEND_REASON
			})
		);
		expect(suspended.basis).toEqual([
			{ kind: 'acknowledgement', refId: f.ackB, docNumber: f.docNumber, revision: 'B' },
			{ kind: 'attempt', refId: f.passedAttempt, docNumber: null, revision: null },
			{ kind: 'signoff', refId: f.signoff, docNumber: f.docNumber, revision: 'B' }
		]);

		// Instants are ISO 8601 UTC strings throughout.
		const instants = [...text.matchAll(/"\w+At": "([^"]+)"/g)].map((m) => m[1]);
		expect(instants.length).toBeGreaterThan(10);
		for (const v of instants) expect(v).toMatch(/^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}:\d{2}\.\d{3}Z$/);

		// Only this person's data: not the other person's acknowledgement, certificate or name.
		expect(mine.acknowledgements.map((a) => a.id)).not.toContain(f.otherAck);
		expect(text).not.toContain(f.otherCertificate);
		expect(text).not.toContain('Someone Else Entirely');
		expect(text).not.toContain(other.employeeNo);

		expect(await latestExportEvent(person.id, person.id)).toMatchObject({
			format: 'json',
			self: true,
			employeeNo: person.employeeNo
		});
	});

	it('gives HR the same history for that person', async () => {
		const res = await download(hr, `/records/people/${person.id}/history.json`);
		const forHr = (await res.json()) as Json;
		const strip = ({ generatedAt: _a, generatedBy: _b, certificates, ...rest }: Json) => ({
			...rest,
			// Status is read against the clock of each request; the rows themselves are the same.
			certificates: certificates.map(({ status: _s, ...c }) => c)
		});
		expect(strip(forHr)).toEqual(strip(mine));
		expect(forHr.generatedBy).toBe('Sofía Herrera');
	});

	it('shows the same person’s records on the My records page, and the PDF is theirs too', async () => {
		const page = await self.get('/my-records');
		expect(page.status).toBe(200);
		const html = await page.text();
		expect(html).toContain(f.suspended.number);
		expect(html).toContain(SUSPEND_REASON);
		expect(html).not.toContain(f.otherCertificate);
		const pdf = await download(self, '/my-records.pdf');
		const read = await readPdfPages(new Uint8Array(await pdf.arrayBuffer()), dir, 'mine');
		expect(read.flat.join(' ')).toContain(`Employee no. ${person.employeeNo}`);
		expect(await latestExportEvent(person.id, person.id)).toMatchObject({
			format: 'pdf',
			self: true
		});
	});
});

describe('who may fetch histories', () => {
	it('gives the downloads to hr and quality only, and asks anyone signed out to sign in', async () => {
		const urls = [
			`/records/people/${person.id}/history.pdf`,
			`/records/people/${person.id}/history.json`
		];
		for (const role of ROLES) {
			const client = await signInAsDemo(role);
			for (const url of urls) {
				const res = await client.get(url, { headers: { accept: '*/*' } });
				await res.body?.cancel();
				expect(res.status, `${role} ${url}`).toBe(role === 'hr' || role === 'quality' ? 200 : 403);
			}
			// Everyone has their own records.
			const own = await client.get('/my-records.json', { headers: { accept: '*/*' } });
			expect(own.status, `${role} own records`).toBe(200);
			const body = await own.json();
			expect(body.person.id).not.toBe(person.id);
		}
		const anonymous = newClient();
		for (const url of [...urls, '/my-records.json', '/my-records.pdf']) {
			const res = await anonymous.get(url);
			expect(res.status, url).toBe(303);
			expect(res.headers.get('location')).toBe(`/signin?redirectTo=${encodeURIComponent(url)}`);
		}
	});

	it('finds people by employee number, line and status on the list page', async () => {
		const found = await (await hr.get(`/records/people?q=${person.employeeNo}`)).text();
		expect(found).toContain(`/records/people/${person.id}`);
		expect(found).not.toContain(`/records/people/${other.id}"`);
		const inactive = await (
			await hr.get(`/records/people?q=${person.employeeNo}&status=inactive`)
		).text();
		expect(inactive).not.toContain(`/records/people/${person.id}`);
		const onL2 = await (await hr.get(`/records/people?q=${person.employeeNo}&line=L2`)).text();
		expect(onL2).not.toContain(`/records/people/${person.id}`);
		const bad = await hr.get('/records/people?line=NO-SUCH-LINE');
		expect(bad.status).toBe(200);
		expect(await bad.text()).toContain('No line NO-SUCH-LINE.');
	});
});
