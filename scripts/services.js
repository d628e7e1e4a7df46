// Brings up what the app needs for a mode: MariaDB, schema, grants, demo data, local fakes.
import { spawn, spawnSync } from 'node:child_process';
import { existsSync, openSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { setTimeout as sleep } from 'node:timers/promises';
import {
	appEnv,
	countRows,
	dbUrls,
	ensureDatabase,
	fail,
	grantAppUser,
	log,
	processAlive,
	root,
	startMariadb
} from './lib.js';
import { applyMigrations } from './migrate.js';

async function portOpen(port) {
	const { connect } = await import('node:net');
	return new Promise((resolve) => {
		const s = connect(port, '127.0.0.1');
		s.once('connect', () => (s.destroy(), resolve(true)));
		s.once('error', () => resolve(false));
	});
}

export /** The S3 fake opens its port before it has made the bucket: wait for the bucket itself. */
async function bucketReady(cfg) {
	try {
		const res = await fetch(`http://127.0.0.1:${cfg.s3Port}/padbridge?max-keys=1`);
		await res.body?.cancel();
		return res.ok;
	} catch {
		return false;
	}
}

export async function startFakes(cfg, { detached = true } = {}) {
	if (existsSync(cfg.runFile)) {
		const prev = JSON.parse(readFileSync(cfg.runFile, 'utf8'));
		if (prev.fakes && processAlive(prev.fakes, 'node') && (await portOpen(cfg.smtpPort))) {
			log(`local fakes already running (pid ${prev.fakes})`);
			return prev.fakes;
		}
	}
	const child = spawn(
		process.execPath,
		[
			join(root, 'scripts/fakes.js'),
			String(cfg.smtpPort),
			String(cfg.mailWebPort),
			String(cfg.s3Port),
			cfg.s3Dir,
			cfg.mailDir
		],
		{
			cwd: root,
			stdio: ['ignore', 'ignore', openSync(join(cfg.dataDir, 'fakes.log'), 'a')],
			detached
		}
	);
	if (detached) child.unref();
	for (let i = 0; i < 60; i++) {
		await sleep(200);
		if ((await portOpen(cfg.smtpPort)) && (await bucketReady(cfg))) {
			log(
				`local fakes started (pid ${child.pid}): SMTP ${cfg.smtpPort}, mail page ${cfg.mailWebPort}, S3 ${cfg.s3Port}`
			);
			return child.pid;
		}
	}
	fail('the local fakes (SMTP catcher, S3 store) did not start');
}

/** The S3 settings of the app environment, for the seed. */
function s3Env(cfg) {
	const e = appEnv(cfg);
	return Object.fromEntries(Object.entries(e).filter(([k]) => k.startsWith('S3_')));
}

export async function prepareServices(cfg, { freshDatabase, seed }) {
	const maria = await startMariadb(cfg);
	ensureDatabase(cfg, { fresh: freshDatabase });
	const urls = dbUrls(cfg);
	log('applying migrations');
	await applyMigrations(urls.owner);
	grantAppUser(cfg);
	// The demo data stores pictures in S3, so the fakes come up before the seed.
	const fakesPid = await startFakes(cfg);
	if (seed && countRows(cfg, 'people') === 0) {
		log('loading the demo plant (Kestrel Bay Optronics, KBO-2)');
		const r = spawnSync(join(root, 'node_modules/.bin/tsx'), [join(root, 'scripts/seed.ts')], {
			cwd: root,
			stdio: 'inherit',
			env: { ...process.env, ...s3Env(cfg), DATABASE_URL: urls.owner }
		});
		if (r.status !== 0) fail('loading the demo data failed');
	}
	return {
		mariadbPid: maria.pid,
		mariadbStarted: maria.started,
		fakesPid,
		overrides: {}
	};
}
