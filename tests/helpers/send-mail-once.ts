// A second Node process running the outbox sender against the same database, as a second app
// instance would: `tsx tests/helpers/send-mail-once.ts <ISO instant>` loops until nothing is left
// and prints the counts as JSON.
import { pool } from '../../src/lib/server/db';
import { sendPendingMail } from '../../src/lib/server/mail/send';

const now = new Date(process.argv[2] ?? Date.now());
let sent = 0;
for (;;) {
	const r = await sendPendingMail(now);
	sent += r.sent;
	if (r.sent + r.failed + r.gaveUp + r.released === 0) break;
}
process.stdout.write(JSON.stringify({ sent }));
await pool.end();
