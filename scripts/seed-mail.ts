// Demo data for the mail outbox: one notice the plant's mail relay refused for good, so the admin's
// Mail outbox page has something to show and to send again.
import { eq } from 'drizzle-orm';
import { db } from '../src/lib/server/db/index';
import { mailOutbox, people } from '../src/lib/server/db/schema/index';
import { MAX_ATTEMPTS, queueMail } from '../src/lib/server/mail/outbox';

export async function seedMail() {
	const [trainer] = await db
		.select({ id: people.id })
		.from(people)
		.where(eq(people.email, 'trainer@kbo2.example'));
	if (!trainer) return;
	const queuedAt = new Date(Date.now() - 2 * 86_400_000);
	await db.transaction(async (tx) => {
		await queueMail(tx, {
			kind: 'review_requested',
			dedupeKey: 'demo:relay-refused:review',
			toPersonId: trainer.id,
			subject: 'Review requested: WI-FOG-003 revision C (demo)',
			text: 'A draft revision of WI-FOG-003 waits for your review.',
			html: '<p>A draft revision of WI-FOG-003 waits for your review.</p>',
			now: queuedAt
		});
		await tx
			.update(mailOutbox)
			.set({
				attempts: MAX_ATTEMPTS,
				lastError: '552 5.2.2 Mailbox full: trainer@kbo2.example is over its quota'
			})
			.where(eq(mailOutbox.dedupeKey, 'demo:relay-refused:review'));
	});
}
