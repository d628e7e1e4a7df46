// `npm test`: the same set-up as `npm start` on separate ports and a fresh test database, then
// every check: svelte-check, Prettier + ESLint, Vitest (unit and integration against the real
// MariaDB and the built server), and Playwright in Debian's Chromium.
import { spawn, spawnSync } from 'node:child_process';
import { rmSync } from 'node:fs';
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

const started = Date.now();
const only = process.argv.slice(2); // e.g. `npm test -- vitest` runs only the named steps
ensureDebianPackages([
	'mariadb-server',
	'mariadb-client',
	'chromium',
	'poppler-utils',
	'unzip',
	'tesseract-ocr',
	'tesseract-ocr-vie',
	'tesseract-ocr-chi-sim'
]);
ensureNodeModules();

const cfg = modeConfig('test');
rmSync(cfg.mailDir, { recursive: true, force: true });
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

function step(name, cmd, args, extraEnv = {}) {
	if (only.length && !only.includes(name)) return true;
	log(`── ${name}: ${[cmd, ...args].join(' ')}`);
	const t = Date.now();
	const r = spawnSync(cmd, args, { cwd: root, stdio: 'inherit', env: { ...env, ...extraEnv } });
	const ok = r.status === 0;
	results.push({ name, ok, seconds: ((Date.now() - t) / 1000).toFixed(1) });
	return ok;
}

async function startApp() {
	app = spawn(process.execPath, [join(root, 'build')], {
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

function cleanup() {
	if (app && app.exitCode === null) app.kill('SIGTERM');
	try {
		if (services.fakesPid) process.kill(services.fakesPid, 'SIGTERM');
	} catch {
		// already stopped
	}
	stopMariadb(cfg);
}
process.on('SIGINT', () => {
	cleanup();
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
	}
} finally {
	cleanup();
}

console.log('\n  step        result   seconds');
for (const r of results) {
	console.log(`  ${r.name.padEnd(11)} ${r.ok ? 'ok    ' : 'FAILED'}   ${r.seconds}`);
}
const failed = results.filter((r) => !r.ok);
console.log(`  total ${((Date.now() - started) / 1000).toFixed(0)} s\n`);
process.exit(failed.length ? 1 : 0);
