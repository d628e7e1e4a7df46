// `npm run stop`: ends a background run started with `npm start -- --detach`.
import { existsSync, readFileSync, rmSync } from 'node:fs';
import { log, modeConfig, processAlive, stopMariadb } from './lib.js';

const mode = process.argv[2] === 'test' ? 'test' : 'dev';
const cfg = modeConfig(mode);
if (!existsSync(cfg.runFile)) {
	log('nothing recorded as running');
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
