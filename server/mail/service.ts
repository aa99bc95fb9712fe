/** What the outbox pages call: reads of the outbox (single queries, passed on from server/mail/db.ts). */
export { getOutboxMessage, listOutbox } from './db';
