// `npm run cluster`: the demo plant served by two app instances behind an nginx load balancer on
// loopback, with one MariaDB, the S3 fake and the SMTP catcher, all on this machine. Ctrl-C stops
// everything it started; `-- --detach` leaves it running; `-- --stop` (or `npm run stop`) ends it.
// `-- --test` runs it on the test installation's ports and database.
import { existsSync, readFileSync } from 'node:fs';
import {
	ensureBuild,
	ensureDebianPackages,
	ensureNodeModules,
	fail,
	log,
	modeConfig,
	processAlive,
	stopMariadb
} from './lib.js';
import { clusterRunning, startCluster, stopCluster } from './cluster-services.js';

const args = process.argv.slice(2);
const cfg = modeConfig(args.includes('--test') ? 'test' : 'dev');

/** Stops the cluster and whatever this command started for it (fakes, MariaDB). */
async function stopAll() {
	const run = await stopCluster(cfg);
	if (run?.fakes && processAlive(run.fakes, 'node')) {
		process.kill(run.fakes, 'SIGTERM');
		log(`stopped the local fakes (pid ${run.fakes})`);
	}
	if (run?.mariadbStarted) stopMariadb(cfg);
	return run;
}

if (args.includes('--stop')) {
	if (!(await stopAll())) log('no cluster recorded as running');
	process.exit(0);
}

if (clusterRunning(cfg)) fail('the cluster is already running; npm run cluster -- --stop ends it');
if (existsSync(cfg.runFile)) {
	const prev = JSON.parse(readFileSync(cfg.runFile, 'utf8'));
	if (prev.app && processAlive(prev.app, 'node'))
		fail(`npm start is running (pid ${prev.app}); npm run stop first, then npm run cluster`);
}

ensureDebianPackages(['mariadb-server', 'mariadb-client', 'nginx']);
ensureNodeModules();
const { prepareServices } = await import('./services.js');
const services = await prepareServices(cfg, { freshDatabase: false, seed: true });
ensureBuild();

const detach = args.includes('--detach');
let run;
try {
	run = await startCluster(cfg, {
		extra: { fakes: services.fakesPid, mariadbStarted: services.mariadbStarted }
	});
} catch (err) {
	await stopAll();
	fail(err.message);
}

const { demoSignIns } = await import('./demo-accounts.js');
console.log(`
  Padbridge (balanced):   ${run.balancer}
  Instances:              ${run.instances.map((p) => `${p.name} 127.0.0.1:${p.port}`).join(', ')}
                          (each answer carries X-Padbridge-Instance; both run the scheduled jobs,
                          a lease in job_leases gives each run to one of them)
  Caught mail:            http://127.0.0.1:${cfg.mailWebPort}
  S3-compatible store:    http://127.0.0.1:${cfg.s3Port}  (bucket padbridge)
  MariaDB:                127.0.0.1:${cfg.dbPort}  (data in .data/${cfg.mode}/mariadb)
  Balancer log:           .data/${cfg.mode}/cluster/nginx/access.log

  Demo sign-ins (plant KBO-2, Kestrel Bay Optronics):
${demoSignIns()}
  ${detach ? 'Running in the background: npm run cluster -- --stop (or npm run stop) ends it.' : 'Ctrl-C stops everything this command started.'}
`);

if (!detach) {
	let stopping = false;
	const onSignal = async () => {
		if (stopping) return;
		stopping = true;
		log('stopping');
		await stopAll();
		process.exit(0);
	};
	process.on('SIGINT', onSignal);
	process.on('SIGTERM', onSignal);
	// Keep the command in the foreground until a signal comes.
	setInterval(() => {
		if (!clusterRunning(cfg) && !stopping) {
			log('the cluster stopped by itself; stopping the rest');
			onSignal();
		}
	}, 5_000);
}
