import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import request from 'supertest';
import nodemailer, { type SendMailOptions } from 'nodemailer';
import { pino } from 'pino';
import { createApp } from '../../../server/app';
import { createMailer } from '../../../server/mail/public';
import { createTestApp, csrfFromHtml, signInPages, type TestApp } from '../../helpers/app';

let t: TestApp;
beforeEach(async () => {
  t = await createTestApp();
});
afterEach(async () => {
  await t.close();
});

async function askReset(app: Parameters<typeof request.agent>[0], email: string) {
  const visitor = request.agent(app);
  const page = await visitor.get('/password/forgot');
  await visitor.post('/password/forgot').type('form').send({ _csrf: csrfFromHtml(page.text), email }).expect(200);
  await new Promise((r) => setTimeout(r, 300)); // the message is sent after the answer
}

describe('live links in the outbox', () => {
  it('with SMTP configured, the stored and shown message has its link removed; the sent one keeps it', async () => {
    const sent: string[] = [];
    // An SMTP setting with a transport that records what would go over the wire.
    const json = nodemailer.createTransport({ jsonTransport: true });
    const transport = { sendMail: async (m: SendMailOptions) => { sent.push(String(m.text)); return json.sendMail(m); } };
    const config = { ...t.config, SMTP_URL: 'smtp://mail.crowntip.test:587' };
    const mailer = createMailer(t.db, { smtpUrl: config.SMTP_URL, from: config.MAIL_FROM, logger: pino({ level: 'silent' }), transport });
    const app = createApp({ config, db: t.db, mailer, sessionSecret: 'test-secret-test-secret-test-secret' });

    await askReset(app, 'clerk@crowntip.test');
    expect(sent).toHaveLength(1);
    expect(sent[0]).toMatch(/http:\/\/crowntip\.test:3000\/password\/reset\/\S{20,}/);
    const row = await t.db('mail_outbox').where('to_address', 'clerk@crowntip.test').first();
    expect(row.status).toBe('sent');
    expect(row.text_body).not.toContain('/password/reset/');
    expect(row.text_body).toContain('[link removed');
    expect(row.raw).toBeNull();

    const admin = await signInPages(app, 'admin@crowntip.test');
    const shown = await admin.get(`/admin/outbox/${row.id}`);
    expect(shown.status).toBe(200);
    expect(shown.text).not.toContain('/password/reset/');
  });

  it('in capture mode (no SMTP) the link stays visible, labelled as the local stand-in for e-mail', async () => {
    await askReset(t.app, 'clerk@crowntip.test');
    const row = await t.db('mail_outbox').where('to_address', 'clerk@crowntip.test').first();
    expect(row.text_body).toMatch(/\/password\/reset\/\S{20,}/);
    const admin = await signInPages(t.app, 'admin@crowntip.test');
    const list = await admin.get('/admin/outbox');
    expect(list.text).toContain('local stand-in for e-mail');
    const shown = await admin.get(`/admin/outbox/${row.id}`);
    expect(shown.text).toMatch(/\/password\/reset\/\S{20,}/);
    expect(shown.text).toContain('local stand-in for e-mail');
  });
});
