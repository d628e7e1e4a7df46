// E-mail through the outbox: queue in the event's transaction, send from the scheduler.
export { queueMail, MAX_ATTEMPTS, type MailKind, type QueueMailResult } from './outbox';
export {
	queueAssignmentMail,
	queueExpiringMail,
	queueRetrainingMail,
	queueReviewRequestedMail,
	queueSupervisedRunMail,
	queueSuspensionMail
} from './events';
export { sendPendingMail } from './send';
export { queueExpiryReminders } from './reminders';
export { queueLeadDigests } from './digest';
