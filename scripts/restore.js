// `npm run restore -- <file>`: checks every part of a backup against its manifest, loads the dump
// into the mode's database (which must be empty; `--force` replaces it), grants the app user
// again and puts the objects back into the bucket (empty too, unless `--force`).
// Options: `--test` (the test installation), `--database NAME` and `--bucket NAME` (restore
// elsewhere, e.g. for a drill beside the live data). Stop the app first (`npm run stop`).
import { existsSync, readFileSync } from 'node:fs';
import { ensureNodeModules, fail, log, modeConfig, processAlive } from './lib.js';
import { clusterRunning } from './cluster-services.js';

const args = process.argv.slice(2);
const cfg = modeConfig(args.includes('--test') ? 'test' : 'dev');
const valueOf = (flag) => {
	const i = args.indexOf(flag);
	if (i < 0) return undefined;
	if (!args[i + 1] || args[i + 1].startsWith('--')) fail(`${flag} needs a value`);
	return args[i + 1];
};
const database = valueOf('--database');
const bucket = valueOf('--bucket');
const force = args.includes('--force');
const file = args.find(
	(a, i) => !a.startsWith('--') && !['--database', '--bucket'].includes(args[i - 1])
);
if (!file)
	fail(
		'usage: npm run restore -- <backup file> [--test] [--force] [--database NAME] [--bucket NAME]'
	);

if (!database && existsSync(cfg.runFile)) {
	const run = JSON.parse(readFileSync(cfg.runFile, 'utf8'));
	if (run.app && processAlive(run.app, 'node'))
		fail(`Padbridge is running on this database (pid ${run.app}); npm run stop first`);
}
if (!database && clusterRunning(cfg))
	fail('the cluster is running on this database; npm run stop first');

ensureNodeModules();
const { restoreBackup, withLocalServices } = await import('./backup-archive.js');
try {
	const r = await withLocalServices(cfg, () =>
		restoreBackup(cfg, file, { database, bucket, force })
	);
	console.log(`
  restored:        backup of ${r.createdAt}
  database:        ${r.database}, ${r.tables} tables, ${Object.values(r.rowCounts).reduce((a, b) => a + b, 0)} rows, app user granted again (${r.dbSeconds.toFixed(1)} s)
  object store:    ${r.objects} objects into bucket ${r.bucket}, each read back and checked
  took:            ${r.seconds.toFixed(1)} s`);
	if (r.countNotes.length) {
		console.log('  rows that changed while the dump ran (the dump itself is consistent):');
		for (const n of r.countNotes) console.log(`    ${n}`);
	}
	console.log('');
} catch (err) {
	fail(`restore failed: ${err.message}`);
}
log('done');
