// `npm run backup`: the database (mariadb-dump, one consistent transaction, with triggers and
// procedures) and every object of the store in one .tar.gz under .data/backups, with a manifest
// holding the SHA-256 of every part. `-- --test` backs up the test installation instead;
// `-- --out FILE` chooses the file. MariaDB and the local S3 fake are started for the run when
// they are not running, and stopped again after.
import { ensureNodeModules, fail, log, modeConfig, root } from './lib.js';
import { relative } from 'node:path';

const args = process.argv.slice(2);
const cfg = modeConfig(args.includes('--test') ? 'test' : 'dev');
const outAt = args.indexOf('--out');
const outFile = outAt >= 0 ? args[outAt + 1] : undefined;
if (outAt >= 0 && !outFile) fail('--out needs a file name');

ensureNodeModules();
const { createBackup, withLocalServices } = await import('./backup-archive.js');
try {
	const r = await withLocalServices(cfg, () => createBackup(cfg, { outFile }));
	const mb = (n) => `${(n / 1048576).toFixed(2)} MB`;
	console.log(`
  backup written:  ${relative(root, r.file)}  (${mb(r.bytes)} compressed)
  database:        ${cfg.dbName}, ${r.tables} tables, ${Object.values(r.rowCounts).reduce((a, b) => a + b, 0)} rows, dump ${mb(r.dumpBytes)} in ${r.dumpSeconds.toFixed(1)} s
  object store:    ${r.objects} objects, ${mb(r.objectBytes)}
  took:            ${r.seconds.toFixed(1)} s
  restore with:    npm run restore -- ${relative(root, r.file)}${cfg.mode === 'test' ? ' --test' : ''}
`);
} catch (err) {
	fail(`backup failed: ${err.message}`);
}
log('done');
