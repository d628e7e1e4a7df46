// `npm run stop`: ends a background run started with `npm start -- --detach` or
// `npm run cluster -- --detach` (`npm run stop -- test` for the test ports).
import { existsSync, readFileSync, rmSync } from 'node:fs';
import { log, modeConfig, processAlive, stopMariadb } from './lib.js';
import { stopCluster } from './cluster-services.js';

const mode = process.argv[2] === 'test' ? 'test' : 'dev';
const cfg = modeConfig(mode);
const cluster = await stopCluster(cfg);
if (cluster?.fakes && processAlive(cluster.fakes, 'node')) {
	process.kill(cluster.fakes, 'SIGTERM');
	log(`stopped fakes (pid ${cluster.fakes})`);
}
if (!existsSync(cfg.runFile)) {
	if (!cluster) log('nothing recorded as running');
} else {
	const run = JSON.parse(readFileSync(cfg.runFile, 'utf8'));
	for (const [name, pid] of [
		['app', run.app],
		['fakes', run.fakes]
	]) {
		if (pid && processAlive(pid)) {
			process.kill(pid, 'SIGTERM');
			log(`stopped ${name} (pid ${pid})`);
		}
	}
	rmSync(cfg.runFile, { force: true });
}
stopMariadb(cfg);
