/** Where a message in the outbox stands, as "My messages" shows it. */
export type MessageStatus = 'sent' | 'failed' | 'pending' | 'retrying' | 'digest';
