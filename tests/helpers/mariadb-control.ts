// Stops and starts the test MariaDB from a test, through the same script functions `npm test`
// uses (run in a child process: scripts/lib.js is plain JS outside the type check).
import { execFile } from 'node:child_process';
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
