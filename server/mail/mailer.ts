import nodemailer, { type Transporter } from 'nodemailer';
import type { Knex } from 'knex';
import type { Logger } from 'pino';
import { insertOutboxMessage } from './db';
import type { Mail, Mailer } from '../platform/mail';

export type { Mail, MailAttachment, Mailer } from '../platform/mail';

/**
 * nodemailer with SMTP when SMTP_URL is set; otherwise its stream transport builds the complete
 * message without sending it (the local stand-in for development and tests). Either way the
 * message is recorded in the outbox table that the admin Outbox page lists.
 */
export const REDACTED_LINK = '[link removed: it works only for the recipient]';

/**
 * With real mail, the outbox keeps a copy without the live links (their tokens are stored only
 * as hashes; a readable copy would undo that). In capture mode the outbox is the only way to
 * reach the message, so the link stays.
 */
const redact = (text: string, secrets: string[]) => secrets.reduce((t, s) => (s ? t.split(s).join(REDACTED_LINK) : t), text);

export function createMailer(
  db: Knex,
  opts: { smtpUrl?: string; from: string; logger: Logger; transport?: Pick<Transporter, 'sendMail'> },
): Mailer {
  const capture = !opts.smtpUrl;
  const transport: Pick<Transporter, 'sendMail'> =
    opts.transport ?? (capture ? nodemailer.createTransport({ streamTransport: true, buffer: true, newline: 'unix' }) : nodemailer.createTransport(opts.smtpUrl));

  return {
    async send(mail) {
      const attachmentsMeta = (mail.attachments ?? []).map((a) => ({
        filename: a.filename,
        contentType: a.contentType,
        size: a.content.length,
      }));
      const secrets = capture ? [] : (mail.secrets ?? []);
      const base = {
        to: mail.to,
        subject: mail.subject,
        text: redact(mail.text, secrets),
        html: mail.html ? redact(mail.html, secrets) : null,
        attachments: attachmentsMeta,
      };
      try {
        const info = await transport.sendMail({
          from: opts.from,
          to: mail.to,
          subject: mail.subject,
          text: mail.text,
          html: mail.html,
          attachments: mail.attachments,
        });
        const raw = capture ? (info.message as Buffer).toString('utf8') : null;
        return await insertOutboxMessage(db, mail.organisationId, { ...base, raw, status: capture ? 'captured' : 'sent', error: null });
      } catch (err) {
        opts.logger.error({ err, to: mail.to, subject: mail.subject }, 'mail not sent');
        await insertOutboxMessage(db, mail.organisationId, {
          ...base,
          raw: null,
          status: 'failed',
          error: String((err as Error).message ?? err).slice(0, 1000),
        });
        throw err;
      }
    },
  };
}
