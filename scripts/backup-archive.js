// Backups of one Padbridge installation: the MariaDB database (mariadb-dump in one consistent
// transaction, with its triggers and definer-rights procedures) and every object of the object
// store (listed and fetched over the S3 protocol), in one .tar.gz with a manifest that holds the
// SHA-256 of every part. A restore checks every part against the manifest before it touches
// anything, loads into a database that must be empty (unless forced), grants the app user again
// and puts the objects back.
import {
	CreateBucketCommand,
	DeleteObjectsCommand,
	GetObjectCommand,
	HeadBucketCommand,
	ListObjectsV2Command,
	PutObjectCommand,
	S3Client
} from '@aws-sdk/client-s3';
import { spawn } from 'node:child_process';
import { createHash } from 'node:crypto';
import {
	chmodSync,
	createReadStream,
	createWriteStream,
	existsSync,
	mkdirSync,
	mkdtempSync,
	readFileSync,
	renameSync,
	rmSync,
	statSync,
	writeFileSync
} from 'node:fs';
import { join, resolve } from 'node:path';
import { pipeline } from 'node:stream/promises';
import * as tar from 'tar';
import {
	appEnv,
	ensureDatabase,
	grantAppUser,
	mariadbCli,
	startMariadb,
	stopMariadb
} from './lib.js';

export const BACKUP_FORMAT = 'padbridge-backup/1';
const DUMP_FILE = 'database.sql';
const MANIFEST_FILE = 'manifest.json';

const sha256 = (bytes) => createHash('sha256').update(bytes).digest('hex');

async function sha256File(path) {
	const h = createHash('sha256');
	await pipeline(createReadStream(path), h);
	return h.digest('hex');
}

/**
 * Where the objects live: the S3_* settings of the environment when set (a real store), otherwise
 * the mode's local fake, as the app itself is configured.
 */
export function s3Settings(cfg, bucket) {
	const local = appEnv(cfg);
	const e = process.env.S3_ENDPOINT ? process.env : local;
	return {
		endpoint: e.S3_ENDPOINT,
		region: e.S3_REGION ?? 'us-east-1',
		bucket: bucket ?? e.S3_BUCKET ?? 'padbridge',
		accessKeyId: e.S3_ACCESS_KEY_ID ?? local.S3_ACCESS_KEY_ID,
		secretAccessKey: e.S3_SECRET_ACCESS_KEY ?? local.S3_SECRET_ACCESS_KEY
	};
}

/** An S3 client for these settings (path-style, as the local fake needs). */
export function s3Client(s) {
	return new S3Client({
		endpoint: s.endpoint || undefined,
		region: s.region,
		forcePathStyle: true,
		credentials: { accessKeyId: s.accessKeyId, secretAccessKey: s.secretAccessKey }
	});
}

/** Every key in the bucket, page by page. */
export async function listKeys(client, bucket) {
	const keys = [];
	let token;
	do {
		const page = await client.send(
			new ListObjectsV2Command({ Bucket: bucket, ContinuationToken: token })
		);
		for (const o of page.Contents ?? []) if (o.Key) keys.push(o.Key);
		token = page.IsTruncated ? page.NextContinuationToken : undefined;
	} while (token);
	return keys;
}

/** An object's bytes and content type. */
export async function fetchObject(client, bucket, key) {
	const res = await client.send(new GetObjectCommand({ Bucket: bucket, Key: key }));
	return {
		bytes: res.Body ? await res.Body.transformToByteArray() : new Uint8Array(),
		contentType: res.ContentType ?? 'application/octet-stream'
	};
}

/** Runs a program with stdin/stdout bound to files; rejects with its stderr when it fails. */
function runWithFiles(cmd, args, { stdinFile, stdoutFile }) {
	return new Promise((resolvePromise, reject) => {
		const child = spawn(cmd, args, {
			stdio: [stdinFile ? 'pipe' : 'ignore', stdoutFile ? 'pipe' : 'ignore', 'pipe']
		});
		let stderr = '';
		child.stderr.on('data', (d) => (stderr += d));
		const piping = [];
		if (stdinFile) piping.push(pipeline(createReadStream(stdinFile), child.stdin));
		if (stdoutFile) piping.push(pipeline(child.stdout, createWriteStream(stdoutFile)));
		child.on('error', reject);
		child.on('close', (code) => {
			Promise.all(piping).then(() => {
				if (code === 0) resolvePromise();
				else reject(new Error(`${cmd} failed (exit ${code}): ${stderr.trim().slice(0, 2000)}`));
			}, reject);
		});
	});
}

/** Row counts of every table, all read in one consistent snapshot. */
export function tableRowCounts(cfg, database) {
	const tables = mariadbCli(
		cfg,
		`SELECT table_name FROM information_schema.tables WHERE table_schema = '${database}' AND table_type = 'BASE TABLE' ORDER BY table_name;`
	)
		.split('\n')
		.map((t) => t.trim())
		.filter(Boolean);
	if (!tables.length) return {};
	const union = tables
		.map((t) => `SELECT '${t}', COUNT(*) FROM \`${database}\`.\`${t}\``)
		.join(' UNION ALL ');
	const out = mariadbCli(
		cfg,
		`START TRANSACTION WITH CONSISTENT SNAPSHOT, READ ONLY; ${union}; COMMIT;`
	);
	const counts = {};
	for (const line of out.split('\n').filter(Boolean)) {
		const [t, n] = line.split('\t');
		counts[t] = Number(n);
	}
	return counts;
}

function stamp(d) {
	return d
		.toISOString()
		.replace(/[-:]/g, '')
		.replace(/\.\d+Z$/, 'Z');
}

/**
 * Writes a backup of the mode's database and object store to `outFile` (default: a dated file
 * in .data/backups). Returns where it went and what it holds.
 */
export async function createBackup(cfg, { outFile, database = cfg.dbName, bucket } = {}) {
	const started = performance.now();
	const createdAt = new Date();
	mkdirSync(cfg.backupDir, { recursive: true, mode: 0o700 });
	const file = resolve(
		outFile ?? join(cfg.backupDir, `padbridge-${cfg.mode}-${stamp(createdAt)}.tar.gz`)
	);
	const staging = mkdtempSync(join(cfg.backupDir, '.staging-'));
	try {
		// Counts first, then the dump: the dump's snapshot is at least as new as the counts.
		const rowCounts = tableRowCounts(cfg, database);
		const server = mariadbCli(cfg, 'SELECT VERSION();').trim();
		const dumpPath = join(staging, DUMP_FILE);
		await runWithFiles(
			'mariadb-dump',
			[
				'--no-defaults',
				`--socket=${cfg.socket}`,
				'-uroot',
				'--single-transaction',
				'--routines',
				'--triggers',
				'--hex-blob',
				'--default-character-set=utf8mb4',
				'--tz-utc',
				database
			],
			{ stdoutFile: dumpPath }
		);
		const dumpMs = performance.now() - started;

		// Objects are listed after the dump, so every file the dumped rows name is in the store
		// (uploads are stored before their row commits); newer objects are harmless extras.
		const s3 = s3Settings(cfg, bucket);
		const client = s3Client(s3);
		const keys = await listKeys(client, s3.bucket);
		mkdirSync(join(staging, 'objects'));
		const objects = [];
		for (const [i, key] of keys.entries()) {
			const { bytes, contentType } = await fetchObject(client, s3.bucket, key);
			// Stored under a number, never under the key: a key is not trusted as a path.
			const name = `objects/${String(i + 1).padStart(6, '0')}`;
			writeFileSync(join(staging, name), bytes);
			objects.push({
				key,
				file: name,
				bytes: bytes.byteLength,
				sha256: sha256(bytes),
				contentType
			});
		}
		client.destroy();

		const manifest = {
			format: BACKUP_FORMAT,
			createdAt: createdAt.toISOString(),
			mode: cfg.mode,
			source: { database, server, bucket: s3.bucket, endpoint: s3.endpoint ?? null },
			database: {
				file: DUMP_FILE,
				bytes: statSync(dumpPath).size,
				sha256: await sha256File(dumpPath),
				rowCountsBeforeDump: rowCounts
			},
			objects
		};
		writeFileSync(join(staging, MANIFEST_FILE), JSON.stringify(manifest, null, 2));
		const partial = `${file}.partial`;
		await tar.create({ gzip: true, file: partial, cwd: staging, portable: true }, [
			MANIFEST_FILE,
			DUMP_FILE,
			'objects'
		]);
		// It holds password hashes and personal data: readable by its owner only.
		chmodSync(partial, 0o600);
		renameSync(partial, file);
		return {
			file,
			bytes: statSync(file).size,
			dumpBytes: manifest.database.bytes,
			objects: objects.length,
			objectBytes: objects.reduce((n, o) => n + o.bytes, 0),
			tables: Object.keys(rowCounts).length,
			rowCounts,
			dumpSeconds: dumpMs / 1000,
			seconds: (performance.now() - started) / 1000
		};
	} finally {
		rmSync(staging, { recursive: true, force: true });
	}
}

/** Unpacks an archive and checks every part against the manifest; throws on any difference. */
async function unpackVerified(file, into) {
	if (!existsSync(file)) throw new Error(`no such backup file: ${file}`);
	// Plain files and folders only: a link in a crafted archive could point anywhere.
	await tar.extract({
		file,
		cwd: into,
		strict: true,
		filter: (_path, entry) => entry.type === 'File' || entry.type === 'Directory'
	});
	const mPath = join(into, MANIFEST_FILE);
	if (!existsSync(mPath)) throw new Error('not a Padbridge backup: it has no manifest.json');
	const manifest = JSON.parse(readFileSync(mPath, 'utf8'));
	if (manifest.format !== BACKUP_FORMAT)
		throw new Error(`unknown backup format ${JSON.stringify(manifest.format)}`);
	const problems = [];
	const check = async (name, bytes, hash) => {
		if (!/^(database\.sql|objects\/\d{6})$/.test(name)) {
			problems.push(`${name}: unexpected part name`);
			return;
		}
		const path = join(into, name);
		if (!existsSync(path)) return problems.push(`${name}: missing`);
		if (statSync(path).size !== bytes) problems.push(`${name}: size differs from the manifest`);
		else if ((await sha256File(path)) !== hash) problems.push(`${name}: SHA-256 differs`);
	};
	await check(manifest.database.file, manifest.database.bytes, manifest.database.sha256);
	for (const o of manifest.objects) await check(o.file, o.bytes, o.sha256);
	if (problems.length)
		throw new Error(`the backup is damaged, nothing was restored:\n  ${problems.join('\n  ')}`);
	return manifest;
}

async function bucketExists(client, bucket) {
	try {
		await client.send(new HeadBucketCommand({ Bucket: bucket }));
		return true;
	} catch (err) {
		if (err?.$metadata?.httpStatusCode === 404 || err?.name === 'NotFound') return false;
		throw err;
	}
}

/** Deletes every object in the bucket. */
export async function emptyBucket(client, bucket) {
	const keys = await listKeys(client, bucket);
	for (let i = 0; i < keys.length; i += 1000) {
		await client.send(
			new DeleteObjectsCommand({
				Bucket: bucket,
				Delete: { Objects: keys.slice(i, i + 1000).map((Key) => ({ Key })) }
			})
		);
	}
}

const identifier = /^[A-Za-z0-9_]{1,64}$/;

/**
 * Restores an archive into `database` (default: the mode's) and `bucket` (default: the app's).
 * Both must be empty unless `force`, which drops the database and empties the bucket first.
 */
export async function restoreBackup(
	cfg,
	file,
	{ database = cfg.dbName, bucket, force = false } = {}
) {
	if (!identifier.test(database)) throw new Error(`not a database name: ${database}`);
	const started = performance.now();
	mkdirSync(cfg.backupDir, { recursive: true, mode: 0o700 });
	const work = mkdtempSync(join(cfg.backupDir, '.restore-'));
	try {
		const manifest = await unpackVerified(resolve(file), work);
		const s3 = s3Settings(cfg, bucket);
		const client = s3Client(s3);

		// Refuse before touching anything.
		const tableCount = Number(
			mariadbCli(
				cfg,
				`SELECT COUNT(*) FROM information_schema.tables WHERE table_schema = '${database}';`
			).trim()
		);
		const hasBucket = await bucketExists(client, s3.bucket);
		// One page says enough (no MaxKeys: the local fake fails on a small one).
		const held = hasBucket
			? ((await client.send(new ListObjectsV2Command({ Bucket: s3.bucket }))).Contents ?? []).length
			: 0;
		if (!force && (tableCount > 0 || held > 0)) {
			const what = [
				tableCount > 0 ? `database ${database} has ${tableCount} tables` : null,
				held > 0 ? `bucket ${s3.bucket} holds objects` : null
			].filter(Boolean);
			throw new Error(
				`refusing to restore over existing data: ${what.join(' and ')}. Restore into an empty one, or pass --force to replace it.`
			);
		}

		// The users (the definer of the procedures and triggers, and the app) exist before loading.
		ensureDatabase(cfg);
		mariadbCli(
			cfg,
			`${force ? `DROP DATABASE IF EXISTS \`${database}\`;` : ''}
CREATE DATABASE IF NOT EXISTS \`${database}\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci;`
		);
		await runWithFiles(
			'mariadb',
			[
				'--no-defaults',
				`--socket=${cfg.socket}`,
				'-uroot',
				'--default-character-set=utf8mb4',
				database
			],
			{ stdinFile: join(work, manifest.database.file) }
		);
		grantAppUser({ ...cfg, dbName: database });
		const dbSeconds = (performance.now() - started) / 1000;

		if (!hasBucket) await client.send(new CreateBucketCommand({ Bucket: s3.bucket }));
		else if (force) await emptyBucket(client, s3.bucket);
		for (const o of manifest.objects) {
			await client.send(
				new PutObjectCommand({
					Bucket: s3.bucket,
					Key: o.key,
					Body: readFileSync(join(work, o.file)),
					ContentType: o.contentType
				})
			);
		}
		// Read every object back: the store now holds exactly the bytes the backup vouched for.
		const unreadable = [];
		for (const o of manifest.objects) {
			const { bytes } = await fetchObject(client, s3.bucket, o.key);
			if (sha256(bytes) !== o.sha256) unreadable.push(o.key);
		}
		client.destroy();
		if (unreadable.length)
			throw new Error(`objects differ after upload: ${unreadable.slice(0, 10).join(', ')}`);

		const rowCounts = tableRowCounts(cfg, database);
		const before = manifest.database.rowCountsBeforeDump ?? {};
		const countNotes = Object.keys({ ...before, ...rowCounts })
			.filter((t) => before[t] !== rowCounts[t])
			.map(
				(t) =>
					`${t}: ${before[t] ?? 'absent'} counted before the dump, ${rowCounts[t] ?? 'absent'} restored`
			);
		return {
			database,
			bucket: s3.bucket,
			createdAt: manifest.createdAt,
			tables: Object.keys(rowCounts).length,
			rowCounts,
			countNotes,
			objects: manifest.objects.length,
			dbSeconds,
			seconds: (performance.now() - started) / 1000
		};
	} finally {
		rmSync(work, { recursive: true, force: true });
	}
}

/**
 * Runs `fn` with MariaDB and the local object store up: whatever was not running is started for
 * the call and stopped after it.
 */
export async function withLocalServices(cfg, fn) {
	const { bucketReady, startFakes } = await import('./services.js');
	const maria = await startMariadb(cfg);
	let fakesPid = null;
	if (!process.env.S3_ENDPOINT && !(await bucketReady(cfg))) fakesPid = await startFakes(cfg);
	try {
		return await fn();
	} finally {
		if (fakesPid) process.kill(fakesPid, 'SIGTERM');
		if (maria.started) stopMariadb(cfg);
	}
}
