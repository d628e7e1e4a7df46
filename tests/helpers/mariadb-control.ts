// Stops, kills and starts the test MariaDB from a test. Stop and start go through the same script
// functions `npm test` uses (run in a child process: scripts/lib.js is plain JS outside the type
// check); a kill is SIGKILL to the PID in mariadbd's pid file, with liveness read from /proc
// because a killed process can linger here as a zombie.
import { execFile } from 'node:child_process';
import { readFile } from 'node:fs/promises';
import { dirname, join } from 'node:path';
import { setTimeout as sleep } from 'node:timers/promises';
import { promisify } from 'node:util';

const run = promisify(execFile);

async function call(fn: 'stopMariadb' | 'startMariadb') {
	const code = `const l = await import('./scripts/lib.js'); await l.${fn}(l.modeConfig('test'));`;
	await run(process.execPath, ['--input-type=module', '-e', code], {
		cwd: process.cwd(),
		env: process.env,
		timeout: 60_000
	});
}

/** Shuts the test database down (mariadb-admin shutdown over its socket). */
export const stopTestDatabase = () => call('stopMariadb');
/** Starts it again on the same port and data directory; resolves once it answers. */
export const startTestDatabase = () => call('startMariadb');

/** The pid file `startMariadb` passes to mariadbd: beside the socket in the data directory. */
function pidFile(): string {
	const socket = process.env.TEST_DB_SOCKET;
	if (!socket) throw new Error('TEST_DB_SOCKET is not set; run the tests through `npm test`');
	return join(dirname(socket), 'mariadbd.pid');
}

/** Name and state of a process from /proc/PID/status, or null when it is gone. */
export async function procStatus(pid: number): Promise<{ name: string; state: string } | null> {
	try {
		const s = await readFile(`/proc/${pid}/status`, 'utf8');
		return {
			name: /^Name:\s+(\S+)/m.exec(s)?.[1] ?? '',
			state: /^State:\s+(\S)/m.exec(s)?.[1] ?? ''
		};
	} catch {
		return null;
	}
}

/** True while the process runs (not gone, not a zombie), optionally under a given name. */
export async function isRunning(pid: number, name?: string): Promise<boolean> {
	const s = await procStatus(pid);
	return !!s && s.state !== 'Z' && s.state !== 'X' && (!name || s.name.startsWith(name));
}

/**
 * Kills the test database with SIGKILL: no shutdown, no flush, open transactions cut off, as a
 * power cut or the OOM killer would. Resolves with the PID once the process is dead (gone or a
 * zombie); InnoDB's crash recovery runs on the next start.
 */
export async function killTestDatabase(): Promise<number> {
	const pid = Number((await readFile(pidFile(), 'utf8')).trim());
	if (!(await isRunning(pid, 'mariadbd')))
		throw new Error(`mariadbd (pid ${pid} from its pid file) is not running`);
	process.kill(pid, 'SIGKILL');
	for (let i = 0; i < 200; i++) {
		if (!(await isRunning(pid))) return pid;
		await sleep(50);
	}
	throw new Error(`mariadbd (pid ${pid}) still runs 10 s after SIGKILL`);
}
