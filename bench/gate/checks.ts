// Station gate throughput: POST /api/v1/gate/checks on the built server with autocannon, for a
// fixed time at 1, 16 and 64 connections, beside two floors measured in the same run with the same
// settings: a bare node:http server on loopback that answers the same JSON without a database, and
// a bare node:http server that runs the gate's database work through mysql2 (the same reads —
// key, station, processes, person, certificates, supervised run — and the log insert) without
// SvelteKit or the decision code. Ratios are against both floors.
//
// Data: a scratch database `padbridge_scratch_gate` on the dev MariaDB (migrations applied; one
// site, line, station `BN-GATE-01`, process `BN-P1`, person with badge `BN-BADGE-1` holding a
// valid certificate, and a gate key bound to the station), dropped at the end. The built app
// (`npm run build` first) is started on the dev app port + 50 against it, with the scheduler off.
// Usage: npm run bench:gate     (BENCH_DURATION_S=10, BENCH_CONNECTIONS="1 16 64")
// Or against a running app: BENCH_URL=http://127.0.0.1:3000 BENCH_KEY=pbk_… BENCH_STATION=…
// BENCH_BADGE=… npm run bench:gate (then only the no-database floor is measured beside it).
import { spawn, type ChildProcess } from 'node:child_process';
import { createHash, randomBytes } from 'node:crypto';
import { createServer, type Server } from 'node:http';
import { existsSync } from 'node:fs';
import { join } from 'node:path';
import autocannon from 'autocannon';
import mysql from 'mysql2/promise';
import {
	appEnv,
	dbUrls,
	ensureDatabase,
	modeConfig,
	root,
	startMariadb,
	stopMariadb,
	waitForHttp
} from '../../scripts/lib.js';
import { applyMigrations } from '../../scripts/migrate.js';

const DURATION_S = Number(process.env.BENCH_DURATION_S ?? 10);
const CONNECTIONS = (process.env.BENCH_CONNECTIONS ?? '1 16 64').split(/\s+/).map(Number);
const SCRATCH = 'padbridge_scratch_gate';
const STATION = process.env.BENCH_STATION ?? 'BN-GATE-01';
const BADGE = process.env.BENCH_BADGE ?? 'BN-BADGE-1';
const DAY = 86_400_000;

interface Row {
	target: string;
	connections: number;
	rps: number;
	p50: number;
	p99: number;
	errors: number;
	non2xx: number;
}

async function measure(
	target: string,
	url: string,
	key: string,
	connections: number
): Promise<Row> {
	const r = await autocannon({
		url,
		method: 'POST',
		connections,
		duration: DURATION_S,
		headers: { 'content-type': 'application/json', authorization: `Bearer ${key}` },
		body: JSON.stringify({ station: STATION, badge: BADGE })
	});
	return {
		target,
		connections,
		rps: r.requests.average,
		p50: r.latency.p50,
		p99: r.latency.p99,
		errors: r.errors + r.timeouts,
		non2xx: r.non2xx
	};
}

const listen = (server: Server) =>
	new Promise<number>((resolve) =>
		server.listen(0, '127.0.0.1', () => {
			const a = server.address();
			resolve(typeof a === 'object' && a ? a.port : 0);
		})
	);

function readBody(req: import('node:http').IncomingMessage): Promise<string> {
	return new Promise((resolve, reject) => {
		let s = '';
		req.setEncoding('utf8');
		req.on('data', (c) => (s += c));
		req.on('end', () => resolve(s));
		req.on('error', reject);
	});
}

let app: ChildProcess | null = null;
let maria: { started: boolean } | null = null;
let admin: mysql.Connection | null = null;
const cfg = modeConfig('dev');
let url = process.env.BENCH_URL ?? '';
let key = process.env.BENCH_KEY ?? '';
let scratchUrl = '';
let answer = '';

try {
	if (!url) {
		if (!existsSync(join(root, 'build', 'index.js'))) throw new Error('run `npm run build` first');
		maria = await startMariadb(cfg);
		ensureDatabase(cfg);
		const ownerBase = dbUrls(cfg).owner;
		scratchUrl = ownerBase.replace(/\/[^/]+$/, `/${SCRATCH}`);
		admin = await mysql.createConnection({ uri: ownerBase });
		await admin.query(`DROP DATABASE IF EXISTS \`${SCRATCH}\``);
		await admin.query(
			`CREATE DATABASE \`${SCRATCH}\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci`
		);
		await applyMigrations(scratchUrl);
		const conn = await mysql.createConnection({ uri: scratchUrl, timezone: 'Z' });
		const now = new Date();
		await conn.query(
			"INSERT INTO sites (id, code, name, time_zone) VALUES (1, 'KBO-2', 'Bench plant', 'Asia/Ho_Chi_Minh')"
		);
		await conn.query(
			"INSERT INTO `lines` (id, site_id, code, name, active) VALUES (1, 1, 'BN', 'Bench line', 1)"
		);
		await conn.query(
			"INSERT INTO processes (id, code, name, bond_type, active) VALUES (1, 'BN-P1', 'Bench process', 'FOG', 1)"
		);
		await conn.query(
			'INSERT INTO stations (id, line_id, code, name, min_qualified, active) VALUES (1, 1, ?, ?, 1, 1)',
			[STATION, 'Bench station']
		);
		await conn.query('INSERT INTO station_processes (station_id, process_id) VALUES (1, 1)');
		await conn.query(
			`INSERT INTO people (id, employee_no, display_name, badge_no, locale, employment_type, site_id,
			   line_id, active, session_version, created_at, updated_at)
			 VALUES (1, 'BN-0001', 'Bench operator', ?, 'en', 'employee', 1, 1, 1, 1, ?, ?)`,
			[BADGE, now, now]
		);
		await conn.query(
			`INSERT INTO certification_rules (id, process_id, version, pass_mark_pct, practical_required,
			   validity_months, grace_days, reminder_days, show_full_name_on_verify, created_by, created_at,
			   active_from)
			 VALUES (1, 1, 1, 80, 0, 12, 14, '[30,7]', 0, 1, ?, ?)`,
			[now, new Date(now.getTime() - DAY)]
		);
		await conn.query(
			`INSERT INTO certificates (number, person_id, process_id, rule_id, state, issued_at, expires_at,
			   signer_name, signer_role, verify_token_hash)
			 VALUES ('KBO2-BN-0001', 1, 1, 1, 'active', ?, ?, 'Bench signer', 'Quality', SHA2('bench', 256))`,
			[new Date(now.getTime() - 30 * DAY), new Date(now.getTime() + 300 * DAY)]
		);
		key = 'pbk_' + randomBytes(32).toString('base64url');
		await conn.query(
			`INSERT INTO api_keys (name, prefix, secret_hash, scope, station_id, created_at)
			 VALUES ('bench gate key', ?, ?, 'gate', 1, ?)`,
			[key.slice(0, 12), createHash('sha256').update(key, 'utf8').digest('hex'), now]
		);
		await conn.end();

		const port = cfg.appPort + 50;
		url = `http://127.0.0.1:${port}`;
		app = spawn(process.execPath, [join(root, 'build')], {
			cwd: root,
			env: {
				...process.env,
				...appEnv(cfg),
				PORT: String(port),
				ORIGIN: url,
				DATABASE_URL: scratchUrl,
				PADBRIDGE_JOBS: 'off'
			},
			stdio: ['ignore', 'ignore', 'inherit']
		});
		if (!(await waitForHttp(`${url}/api/health`, 30_000))) throw new Error('app did not start');
	}

	const gateUrl = `${url}/api/v1/gate/checks`;
	// The answer the floors send: what the app itself answers for this badge.
	const probe = await fetch(gateUrl, {
		method: 'POST',
		headers: { 'content-type': 'application/json', authorization: `Bearer ${key}` },
		body: JSON.stringify({ station: STATION, badge: BADGE })
	});
	answer = await probe.text();
	if (probe.status !== 200 || !answer.includes('"decision":"allow"'))
		throw new Error(`the gate did not allow the bench badge: ${probe.status} ${answer}`);

	const jsonFloor = createServer(async (req, res) => {
		await readBody(req);
		res.writeHead(200, { 'content-type': 'application/json' }).end(answer);
	});
	const jsonPort = await listen(jsonFloor);

	// The database floor: the gate's reads and its log insert through a mysql2 pool, no framework.
	const pool = scratchUrl
		? mysql.createPool({ uri: scratchUrl, timezone: 'Z', connectionLimit: 10 })
		: null;
	const dbFloor = pool
		? createServer(async (req, res) => {
				const body = JSON.parse(await readBody(req));
				const auth = /^Bearer (\S+)$/.exec(req.headers.authorization ?? '')?.[1] ?? '';
				const hash = createHash('sha256').update(auth, 'utf8').digest('hex');
				const now = new Date();
				const [[k]] = await pool.query<mysql.RowDataPacket[]>(
					"SELECT k.id, k.station_id, s.active FROM api_keys k LEFT JOIN stations s ON s.id = k.station_id WHERE k.secret_hash = ? AND k.revoked_at IS NULL AND k.scope = 'gate'",
					[hash]
				);
				const [[st]] = await pool.query<mysql.RowDataPacket[]>(
					'SELECT id, code, active FROM stations WHERE code = ?',
					[body.station]
				);
				const [procs] = await pool.query<mysql.RowDataPacket[]>(
					'SELECT p.id, p.code FROM station_processes sp JOIN processes p ON p.id = sp.process_id WHERE sp.station_id = ?',
					[st.id]
				);
				const [[person]] = await pool.query<mysql.RowDataPacket[]>(
					'SELECT p.id, p.display_name, p.employee_no, p.active, s.time_zone FROM people p LEFT JOIN sites s ON s.id = p.site_id WHERE p.badge_no = ?',
					[body.badge]
				);
				await pool.query(
					'SELECT c.process_id, c.state, c.expires_at, r.reminder_days FROM certificates c JOIN certification_rules r ON r.id = c.rule_id WHERE c.person_id = ? AND c.process_id IN (?)',
					[person.id, procs.map((p) => p.id)]
				);
				await pool.query(
					'SELECT id FROM supervised_runs WHERE person_id = ? AND station_id = ? AND revoked_at IS NULL AND starts_at <= ? AND ends_at > ? LIMIT 1',
					[person.id, st.id, now, now]
				);
				await pool.query(
					`INSERT INTO gate_checks (at, station_id, station_code, badge, person_id, decision, reasons,
					   warnings, source, api_key_id, latency_ms) VALUES (?, ?, ?, ?, ?, 'allow', '[]', '[]', 'api', ?, 0)`,
					[now, st.id, st.code, body.badge, person.id, k.id]
				);
				res.writeHead(200, { 'content-type': 'application/json' }).end(answer);
			})
		: null;
	const dbPort = dbFloor ? await listen(dbFloor) : 0;

	const rows: Row[] = [];
	for (const c of CONNECTIONS) {
		console.error(`measuring ${DURATION_S} s at ${c} connection(s) …`);
		rows.push(await measure('gate endpoint (full app)', gateUrl, key, c));
		if (dbFloor)
			rows.push(await measure('floor: node:http + mysql2', `http://127.0.0.1:${dbPort}/`, key, c));
		rows.push(await measure('floor: node:http, no DB', `http://127.0.0.1:${jsonPort}/`, key, c));
	}
	jsonFloor.close();
	dbFloor?.close();
	await pool?.end();

	const f = (n: number, d = 0) => n.toFixed(d);
	console.log(
		`\nStation gate, POST /api/v1/gate/checks, ${DURATION_S} s per cell (2-core machine, loopback)\n`
	);
	console.log(
		'| connections | target | req/s | p50 ms | p99 ms | × DB floor | × bare floor | errors |'
	);
	console.log('| ---: | --- | ---: | ---: | ---: | ---: | ---: | ---: |');
	for (const c of CONNECTIONS) {
		const cell = rows.filter((r) => r.connections === c);
		const db = cell.find((r) => r.target.includes('mysql2'));
		const bare = cell.find((r) => r.target.includes('no DB'))!;
		for (const r of cell) {
			console.log(
				`| ${c} | ${r.target} | ${f(r.rps)} | ${f(r.p50, 1)} | ${f(r.p99, 1)} | ${db ? f(r.rps / db.rps, 2) : '—'} | ${f(r.rps / bare.rps, 3)} | ${r.errors + r.non2xx} |`
			);
		}
	}
} finally {
	if (app && app.exitCode === null) app.kill('SIGTERM');
	if (admin) {
		await admin.query(`DROP DATABASE IF EXISTS \`${SCRATCH}\``);
		await admin.end();
	}
	if (maria?.started) stopMariadb(cfg);
}
