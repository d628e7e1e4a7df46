// `npm start`: sets up whatever is missing, then builds and serves Padbridge with the demo plant.
// `npm start -- --detach` leaves it running in the background; `npm run stop` ends it.
import { spawn } from 'node:child_process';
import { existsSync, readFileSync, writeFileSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import {
	appEnv,
	ensureBuild,
	ensureDebianPackages,
	ensureNodeModules,
	log,
	modeConfig,
	processAlive,
	root,
	stopMariadb,
	waitForHttp,
	fail
} from './lib.js';

const detach = process.argv.includes('--detach');
const cfg = modeConfig('dev');

if (existsSync(cfg.runFile)) {
	const prev = JSON.parse(readFileSync(cfg.runFile, 'utf8'));
	if (prev.app && processAlive(prev.app, 'node')) {
		fail(
			`Padbridge is already running (pid ${prev.app}) at http://127.0.0.1:${cfg.appPort}; npm run stop ends it`
		);
	}
}

ensureDebianPackages(['mariadb-server', 'mariadb-client']);
ensureNodeModules();

// Everything below needs npm packages, so it is loaded only now.
const { prepareServices } = await import('./services.js');
const services = await prepareServices(cfg, { freshDatabase: false, seed: true });

ensureBuild();

const env = { ...process.env, ...appEnv(cfg), ...services.overrides };
const app = spawn(process.execPath, [join(root, 'build')], {
	cwd: root,
	env,
	stdio: detach ? ['ignore', 'ignore', 'ignore'] : 'inherit',
	detached: detach
});
if (detach) app.unref();

writeFileSync(
	cfg.runFile,
	JSON.stringify({ app: app.pid, fakes: services.fakesPid, mariadb: services.mariadbPid, detach })
);

if (!(await waitForHttp(`http://127.0.0.1:${cfg.appPort}/api/health`))) {
	app.kill('SIGTERM');
	fail('the app did not answer on /api/health');
}

const { demoSignIns } = await import('./demo-accounts.js');
console.log(`
  Padbridge is running:   http://127.0.0.1:${cfg.appPort}
  Caught mail:            http://127.0.0.1:${cfg.mailWebPort}
  S3-compatible store:    http://127.0.0.1:${cfg.s3Port}  (bucket padbridge)
  MariaDB:                127.0.0.1:${cfg.dbPort}  (data in .data/dev/mariadb)

  Demo sign-ins (plant KBO-2, Kestrel Bay Optronics):
${demoSignIns()}
  ${detach ? 'Running in the background: npm run stop ends it.' : 'Ctrl-C stops everything this command started.'}
`);

if (!detach) {
	let stopping = false;
	const stopAll = () => {
		if (stopping) return;
		stopping = true;
		log('stopping');
		app.kill('SIGTERM');
		if (services.fakesPid) {
			try {
				process.kill(services.fakesPid, 'SIGTERM');
			} catch {
				// already gone
			}
		}
		if (services.mariadbStarted) stopMariadb(cfg);
		rmSync(cfg.runFile, { force: true });
		process.exit(0);
	};
	process.on('SIGINT', stopAll);
	process.on('SIGTERM', stopAll);
	app.on('exit', (code) => {
		if (!stopping) {
			log(`the app exited (${code}); stopping the rest`);
			stopAll();
		}
	});
}
