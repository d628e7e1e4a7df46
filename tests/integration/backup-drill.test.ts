// Restore drill: back up the test database and object store with the same code as `npm run
// backup`, restore into a scratch database and a bucket of its own, and check the copy the way an
// auditor would: row counts per table, the audit hash chain, every electronic signature
// recomputed from the restored records, every object's bytes, the app user's grants, triggers and
// definer-rights procedures. Damaged archives and non-empty targets are refused.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createHash, randomBytes } from 'node:crypto';
import { mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { DeleteBucketCommand } from '@aws-sdk/client-s3';
import { drizzle } from 'drizzle-orm/mysql2';
import { eq } from 'drizzle-orm';
import mysql from 'mysql2/promise';
import sharp from 'sharp';
import * as tar from 'tar';
import {
	createBackup,
	emptyBucket,
	fetchObject,
	listKeys as listBucket,
	restoreBackup,
	s3Client,
	s3Settings,
	tableRowCounts,
	type BackupResult,
	type RestoreResult
} from '../../scripts/backup-archive.js';
import { mariadbCli, modeConfig, revokeAppUser } from '../../scripts/lib.js';
import { db, type Db } from '../../src/lib/server/db/index';
import * as schema from '../../src/lib/server/db/schema/index';
import { verifyAuditChain } from '../../src/lib/server/audit';
import { computeBindingHash } from '../../src/lib/server/instructions/hash';
import { recomputeRevisionHash } from '../../src/lib/server/instructions/signatures';
import { addRevisionFile } from '../../src/lib/server/instructions/files';
import { submitRevision } from '../../src/lib/server/instructions/workflow';
import { getRevision } from '../../src/lib/server/instructions/queries';
import { computeVersionHash } from '../../src/lib/server/training/checks/hash';
import {
	computeSignoffHash,
	loadSignoffItems
} from '../../src/lib/server/training/signoffs/signoffs';
import { appUrl, closeDbHelpers, urlForDatabase } from '../helpers/db';
import { approveAt, createTestPerson, makeInstruction } from '../helpers/instruction-fixtures';

const cfg = modeConfig('test');
const SCRATCH = `${cfg.dbName}_scratch_drill`;
const BUCKET = `padbridge-drill-${randomBytes(3).toString('hex')}`;
const work = mkdtempSync(join(tmpdir(), 'padbridge-drill-'));
const sha256 = (b: Uint8Array) => createHash('sha256').update(b).digest('hex');

const s3 = s3Settings(cfg);
const client = s3Client(s3);
const listKeys = async (bucket: string) => (await listBucket(client, bucket)).sort();
const objectBytes = async (bucket: string, key: string) =>
	(await fetchObject(client, bucket, key)).bytes;

type Conn = Parameters<typeof verifyAuditChain>[0];

/** Every signature row, checked against its record as that database holds it now. */
async function signatureReport(conn: NonNullable<Conn>) {
	const rows = await conn.select().from(schema.signatures).orderBy(schema.signatures.id);
	const out: { id: number; type: string; binding: boolean; content: boolean }[] = [];
	for (const s of rows) {
		let current: string | null = null;
		if (s.recordType === 'revision') current = await recomputeRevisionHash(s.recordId, conn);
		else if (s.recordType === 'check_version') current = await computeVersionHash(s.recordId, conn);
		else if (s.recordType === 'signoff') {
			const [so] = await conn
				.select()
				.from(schema.signoffs)
				.where(eq(schema.signoffs.id, s.recordId));
			current = so ? computeSignoffHash(so, await loadSignoffItems(so.id, conn)) : null;
		}
		out.push({
			id: s.id,
			type: s.recordType,
			binding: computeBindingHash(s) === s.bindingHash,
			content: current !== null && current === s.contentHash
		});
	}
	return out;
}

let sourceCounts: Record<string, number>;
let backup: BackupResult;
let restored: RestoreResult;
let restoredPool: mysql.Pool;
let restoredDb: Db;
let drillRevisionId: number;
let drillFileSha: string;

beforeAll(async () => {
	// A fresh signed revision with an image of its own, so the drill covers the newest writes.
	const trainer = await createTestPerson(['trainer']);
	const quality = await createTestPerson(['quality']);
	const fx = await makeInstruction(
		trainer,
		quality,
		[{ source: '# Restore drill\n\n1. Check the drill image.', stop: 'draft' }],
		{ title: 'Restore drill fixture' }
	);
	drillRevisionId = fx.revisionIds[0];
	const png = await sharp({
		create: { width: 24, height: 16, channels: 3, background: { r: 40, g: 120, b: 200 } }
	})
		.png()
		.toBuffer();
	await addRevisionFile(trainer.actor, drillRevisionId, {
		name: 'drill.png',
		bytes: new Uint8Array(png)
	});
	const rev = (await getRevision(fx.instructionId, 'A'))!;
	drillFileSha = rev.files[0].sha256;
	await submitRevision(trainer.actor, drillRevisionId, {
		version: rev.version,
		changeSummary: 'Drill revision',
		reason: 'Restore drill',
		classification: 'acknowledge'
	});
	await approveAt(quality, drillRevisionId, new Date());

	sourceCounts = tableRowCounts(cfg, cfg.dbName);
	backup = await createBackup(cfg, { outFile: join(work, 'drill.tar.gz') });
	// Nothing wrote while the backup ran, so the counts are the dump's.
	expect(tableRowCounts(cfg, cfg.dbName)).toEqual(sourceCounts);
	restored = await restoreBackup(cfg, backup.file, { database: SCRATCH, bucket: BUCKET });
	console.info(
		`restore drill: backup ${(backup.bytes / 1048576).toFixed(2)} MB (${backup.tables} tables, ` +
			`${backup.objects} objects) in ${backup.seconds.toFixed(2)} s; restore in ` +
			`${restored.seconds.toFixed(2)} s (database ${restored.dbSeconds.toFixed(2)} s)`
	);
	restoredPool = mysql.createPool({
		uri: urlForDatabase(appUrl(), SCRATCH),
		timezone: 'Z',
		connectionLimit: 2,
		charset: 'utf8mb4_unicode_ci'
	});
	restoredDb = drizzle(restoredPool, { schema, mode: 'default', casing: 'snake_case' });
}, 120_000);

afterAll(async () => {
	await restoredPool?.end();
	const scratch = { ...cfg, dbName: SCRATCH };
	mariadbCli(cfg, `DROP DATABASE IF EXISTS \`${SCRATCH}\`;`);
	revokeAppUser(scratch);
	for (const bucket of [BUCKET, `${BUCKET}-x`]) {
		const held = await listKeys(bucket).catch(() => null);
		if (!held) continue;
		await emptyBucket(client, bucket);
		await client.send(new DeleteBucketCommand({ Bucket: bucket }));
	}
	client.destroy();
	rmSync(work, { recursive: true, force: true });
	await closeDbHelpers();
});

describe('restore drill', () => {
	it('restores every table with the same number of rows', () => {
		expect(Object.keys(sourceCounts).length).toBeGreaterThan(40);
		expect(sourceCounts.audit_events).toBeGreaterThan(0);
		expect(restored.rowCounts).toEqual(sourceCounts);
		expect(tableRowCounts(cfg, SCRATCH)).toEqual(sourceCounts);
	});

	it('restores an audit chain that verifies, row for row the same as the source', async () => {
		const source = await verifyAuditChain(db);
		const copy = await verifyAuditChain(restoredDb);
		expect(source.ok).toBe(true);
		expect(copy).toMatchObject({
			ok: true,
			checked: source.checked,
			problems: [],
			brokenAtSeq: null,
			headSeq: source.headSeq,
			headHash: source.headHash
		});
		expect(copy.checked).toBe(sourceCounts.audit_events);
		const [srcHead] = await db.select().from(schema.auditChain);
		const [copyHead] = await restoredDb.select().from(schema.auditChain);
		expect(copyHead).toEqual(srcHead);
	});

	it('recomputes every signature hash from the restored records, as in the source', async () => {
		const source = await signatureReport(db);
		const copy = await signatureReport(restoredDb);
		expect(copy).toEqual(source);
		const valid = (type: string) =>
			copy.filter((s) => s.type === type && s.binding && s.content).length;
		// The demo plant signs all three kinds of record; the drill's own revision is among them.
		expect(valid('revision')).toBeGreaterThan(0);
		expect(valid('check_version')).toBeGreaterThan(0);
		expect(valid('signoff')).toBeGreaterThan(0);
		const drill = copy.filter((s) => s.type === 'revision');
		const [drillSig] = await restoredDb
			.select({ id: schema.signatures.id })
			.from(schema.signatures)
			.where(eq(schema.signatures.recordId, drillRevisionId));
		expect(drill.find((s) => s.id === drillSig.id)).toMatchObject({ binding: true, content: true });
	});

	it('puts back every object byte for byte, and every file a restored row names', async () => {
		const sourceKeys = await listKeys(s3.bucket);
		const copyKeys = await listKeys(BUCKET);
		expect(copyKeys).toEqual(sourceKeys);
		expect(copyKeys.length).toBe(backup.objects);
		for (const key of copyKeys) {
			expect(sha256(await objectBytes(BUCKET, key)), key).toBe(
				sha256(await objectBytes(s3.bucket, key))
			);
		}
		const files = await restoredDb.select().from(schema.revisionFiles);
		expect(files.some((f) => f.sha256 === drillFileSha)).toBe(true);
		for (const f of files) {
			const bytes = await objectBytes(BUCKET, f.storageKey);
			expect(bytes.byteLength, f.storageKey).toBe(f.sizeBytes);
			expect(sha256(bytes), f.storageKey).toBe(f.sha256);
		}
		const pdfs = await restoredDb
			.select({ key: schema.certificates.pdfKey })
			.from(schema.certificates);
		const held = new Set(copyKeys);
		for (const { key } of pdfs) if (key) expect(held.has(key), key).toBe(true);
	});

	it('grants the app user again, append-only tables stay append-only, triggers and procedures are back', async () => {
		const [rows] = await restoredPool.query<mysql.RowDataPacket[]>(
			'SELECT COUNT(*) AS n FROM audit_events'
		);
		expect(Number(rows[0].n)).toBe(sourceCounts.audit_events);
		await expect(
			restoredPool.query("UPDATE audit_events SET reason = 'edited' WHERE seq = 1")
		).rejects.toThrow(/command denied/);
		await expect(restoredPool.query('DELETE FROM audit_events WHERE seq = 1')).rejects.toThrow(
			/command denied/
		);
		const objects = (database: string) =>
			mariadbCli(
				cfg,
				`SELECT CONCAT('trigger ', trigger_name, ' ', definer) FROM information_schema.triggers WHERE trigger_schema = '${database}'
				 UNION ALL SELECT CONCAT('procedure ', routine_name, ' ', definer, ' ', security_type) FROM information_schema.routines WHERE routine_schema = '${database}'
				 ORDER BY 1;`
			);
		const copyObjects = objects(SCRATCH);
		expect(copyObjects).toBe(objects(cfg.dbName));
		expect(copyObjects).toMatch(/trigger check_attempts_immutable/);
		expect(copyObjects).toMatch(/procedure retention_purge_gate_checks \S+ DEFINER/);
		// The app may call the definer-rights procedure on the copy, as on the live database.
		await expect(
			restoredPool.query('CALL retention_purge_gate_checks(?, ?)', [new Date(0), 0])
		).resolves.toBeDefined();
	});

	it('refuses to restore over a database that has tables', async () => {
		await expect(
			restoreBackup(cfg, backup.file, { database: SCRATCH, bucket: `${BUCKET}-x` })
		).rejects.toThrow(/refusing to restore over existing data: database \S+ has \d+ tables/);
	});

	it('refuses a damaged archive before touching any database', async () => {
		const unpacked = join(work, 'unpacked');
		mkdirSync(unpacked);
		await tar.extract({ file: backup.file, cwd: unpacked });
		const manifest = JSON.parse(readFileSync(join(unpacked, 'manifest.json'), 'utf8'));
		const victim = join(unpacked, manifest.objects[0].file);
		const bytes = readFileSync(victim);
		bytes[bytes.length >> 1] ^= 0xff;
		writeFileSync(victim, bytes);
		const damaged = join(work, 'damaged.tar.gz');
		await tar.create({ gzip: true, file: damaged, cwd: unpacked }, [
			'manifest.json',
			'database.sql',
			'objects'
		]);
		const target = `${cfg.dbName}_scratch_damaged`;
		await expect(
			restoreBackup(cfg, damaged, { database: target, bucket: `${BUCKET}-x` })
		).rejects.toThrow(
			/the backup is damaged, nothing was restored:\s+objects\/\d+: SHA-256 differs/
		);
		expect(
			mariadbCli(
				cfg,
				`SELECT COUNT(*) FROM information_schema.schemata WHERE schema_name = '${target}';`
			).trim()
		).toBe('0');
	});
});
