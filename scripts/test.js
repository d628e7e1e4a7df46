// `npm test`: the same set-up as `npm start` on separate ports and a fresh test database, then
// every check: svelte-check, Prettier + ESLint, Vitest (unit and integration against the real
// MariaDB and the built server), Playwright in Debian's Chromium, and a bounded mixed load.
import { spawn, spawnSync } from 'node:child_process';
import { rmSync } from 'node:fs';
import { setTimeout as sleep } from 'node:timers/promises';
import { join } from 'node:path';
import {
	appEnv,
	ensureDebianPackages,
	ensureNodeModules,
	log,
	modeConfig,
	root,
	stopMariadb,
	waitForHttp
} from './lib.js';
import { startCluster, stopCluster } from './cluster-services.js';

const started = Date.now();
const only = process.argv.slice(2); // e.g. `npm test -- vitest` runs only the named steps
ensureDebianPackages([
	'mariadb-server',
	'mariadb-client',
	'chromium',
	'nginx',
	'poppler-utils',
	'unzip',
	'tesseract-ocr',
	'tesseract-ocr-vie',
	'tesseract-ocr-chi-sim'
]);
ensureNodeModules();

const cfg = modeConfig('test');
rmSync(cfg.mailDir, { recursive: true, force: true });
// The test database starts fresh, so its object store does too (no files of earlier runs).
rmSync(cfg.s3Dir, { recursive: true, force: true });
const { prepareServices } = await import('./services.js');
const services = await prepareServices(cfg, { freshDatabase: true, seed: true });
const env = {
	...process.env,
	...appEnv(cfg),
	NODE_ENV: 'test',
	TEST_APP_URL: `http://127.0.0.1:${cfg.appPort}`,
	TEST_DB_SOCKET: cfg.socket,
	TEST_DB_NAME: cfg.dbName
};

const bin = (name) => join(root, 'node_modules/.bin', name);
const results = [];
let app = null;

const wanted = (name) => !only.length || only.includes(name);

function step(name, cmd, args, extraEnv = {}) {
	if (!wanted(name)) return true;
	log(`── ${name}: ${[cmd, ...args].join(' ')}`);
	const t = Date.now();
	const r = spawnSync(cmd, args, { cwd: root, stdio: 'inherit', env: { ...env, ...extraEnv } });
	const ok = r.status === 0;
	results.push({ name, ok, seconds: ((Date.now() - t) / 1000).toFixed(1) });
	return ok;
}

async function startApp(nodeArgs = []) {
	app = spawn(process.execPath, [...nodeArgs, join(root, 'build')], {
		cwd: root,
		// The tests drive the scheduled jobs themselves (with their own `now`), so the test app's
		// scheduler stays off; otherwise it would send and expire rows under the tests' feet.
		env: { ...env, NODE_ENV: 'production', PADBRIDGE_JOBS: 'off' },
		stdio: ['ignore', 'inherit', 'inherit']
	});
	if (!(await waitForHttp(`${env.TEST_APP_URL}/api/health`, 30_000))) {
		throw new Error('the built app did not start');
	}
	log(`test app up at ${env.TEST_APP_URL} (pid ${app.pid})`);
}

/** Stops the app and waits for it, so its in-flight requests end while the database still runs. */
async function stopApp() {
	if (!app || app.exitCode !== null) return;
	const exited = new Promise((resolve) => app.once('exit', resolve));
	app.kill('SIGTERM');
	await Promise.race([exited, sleep(10_000)]);
}

/**
 * Two more instances of the built app with their scheduled jobs on, behind nginx, on the test
 * database (after e2e: their jobs run on the real clock), and the cluster tests through it.
 */
async function clusterStep() {
	if (only.length && !only.includes('cluster')) return;
	const t = Date.now();
	let run;
	try {
		run = await startCluster(cfg, { baseEnv: env });
	} catch (err) {
		console.error(err.message);
		results.push({ name: 'cluster', ok: false, seconds: ((Date.now() - t) / 1000).toFixed(1) });
		return;
	}
	log(`cluster up in ${((Date.now() - t) / 1000).toFixed(1)} s`);
	const instances = run.instances.map((p) => p.name).join(',');
	step('cluster', bin('vitest'), ['run', '--project', 'cluster'], {
		TEST_APP_URL: run.balancer,
		CLUSTER_INSTANCES: instances
	});
	const stopping = Date.now();
	await stopCluster(cfg);
	log(`cluster stopped in ${((Date.now() - stopping) / 1000).toFixed(1)} s`);
	results.at(-1).seconds = ((Date.now() - t) / 1000).toFixed(1);
}

async function cleanup() {
	await stopCluster(cfg);
	if (app && app.exitCode === null) app.kill('SIGTERM');
	try {
		if (services.fakesPid) process.kill(services.fakesPid, 'SIGTERM');
	} catch {
		// already stopped
	}
	stopMariadb(cfg);
}
process.on('SIGINT', async () => {
	await cleanup();
	process.exit(130);
});

try {
	step('sync', bin('svelte-kit'), ['sync']);
	step('check', bin('svelte-check'), ['--tsconfig', './tsconfig.json', '--fail-on-warnings']);
	step('format', bin('prettier'), ['--check', '.']);
	step('lint', bin('eslint'), ['.']);
	const built = step('build', bin('vite'), ['build', '--logLevel', 'error']);
	if (built) {
		await startApp();
		// VITEST_FILTER narrows the run while working, e.g. VITEST_FILTER=certification npm test -- vitest
		step('vitest', bin('vitest'), [
			'run',
			...(process.env.VITEST_FILTER ?? '').split(' ').filter(Boolean)
		]);
		step('e2e', bin('playwright'), [
			'test',
			...(process.env.E2E_FILTER ?? '').split(' ').filter(Boolean)
		]);
		if (wanted('load')) {
			// The same build, restarted with a bounded heap: unbounded, V8 grows its heap lazily for
			// minutes (RSS 300 → 500 MB here), which hides whether memory holds; bounded, the collector
			// must keep up, and a leak ends in a crash or timeouts. The step samples RSS via /proc/PID.
			await stopApp();
			await startApp([`--max-old-space-size=${process.env.LOAD_APP_HEAP_MB ?? 160}`]);
			step('load', bin('tsx'), ['tests/load/mixed-load.ts'], { TEST_APP_PID: String(app.pid) });
		}
		await clusterStep();
	}
} finally {
	await stopApp();
	await cleanup();
}

console.log('\n  step        result   seconds');
for (const r of results) {
	console.log(`  ${r.name.padEnd(11)} ${r.ok ? 'ok    ' : 'FAILED'}   ${r.seconds}`);
}
const failed = results.filter((r) => !r.ok);
console.log(`  total ${((Date.now() - started) / 1000).toFixed(0)} s\n`);
process.exit(failed.length ? 1 : 0);
