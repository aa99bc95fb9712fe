/** What other resources may use of mail: the mailer. */
export { createMailer, type Mailer } from './mailer';
