/** What server/app.ts uses from mail: the mailer and the outbox pages. */
export { createMailer, type Mailer } from './mailer';
export { outboxPages } from './pages';
