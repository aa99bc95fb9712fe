import nodemailer, { type Transporter } from 'nodemailer';
import type { Knex } from 'knex';
import type { Logger } from 'pino';
import { insertOutboxMessage } from './db';

export interface MailAttachment {
  filename: string;
  contentType: string;
  content: Buffer;
}

export interface Mail {
  organisationId: string | null;
  to: string;
  subject: string;
  text: string;
  html?: string;
  attachments?: MailAttachment[];
}

export interface Mailer {
  send(mail: Mail): Promise<string>;
}

/**
 * nodemailer with SMTP when SMTP_URL is set; otherwise its stream transport builds the complete
 * message without sending it (the local stand-in for development and tests). Either way the
 * message is recorded in the outbox table that the admin Outbox page lists.
 */
export function createMailer(db: Knex, opts: { smtpUrl?: string; from: string; logger: Logger }): Mailer {
  const capture = !opts.smtpUrl;
  const transport: Transporter = capture
    ? nodemailer.createTransport({ streamTransport: true, buffer: true, newline: 'unix' })
    : nodemailer.createTransport(opts.smtpUrl);

  return {
    async send(mail) {
      const attachmentsMeta = (mail.attachments ?? []).map((a) => ({
        filename: a.filename,
        contentType: a.contentType,
        size: a.content.length,
      }));
      const base = {
        to: mail.to,
        subject: mail.subject,
        text: mail.text,
        html: mail.html ?? null,
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
