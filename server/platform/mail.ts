/** What every resource may send: a mail and the mailer (made by server/mail/mailer.ts). */

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
  /** Live one-time links in the text: kept out of the stored copy when the mail really goes out. */
  secrets?: string[];
}

export interface Mailer {
  send(mail: Mail): Promise<string>;
}
