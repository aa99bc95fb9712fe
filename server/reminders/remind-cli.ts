// `npm run remind`: e-mails today's sampling reminders now (also when the daily job already ran).
import { pino } from 'pino';
import { loadConfig } from '../platform/config';
import { migrateLatest, openConfiguredDatabase } from '../platform/database';
import { createMailer } from '../mail/public';
import { runReminderJob } from './daily';

const config = loadConfig();
const logger = pino({ level: config.LOG_LEVEL });
const db = openConfiguredDatabase(config);
await migrateLatest(db);
const mailer = createMailer(db, { smtpUrl: config.SMTP_URL, from: config.MAIL_FROM, logger });
const result = await runReminderJob(
  { db, mailer, logger, publicUrl: config.PUBLIC_URL, daysAhead: config.REMIND_DAYS_AHEAD },
  { force: true },
);
console.log(
  result && result.messages
    ? `Sent ${result.messages} reminder(s): ${result.samplers.map((s) => `${s.email} (${s.plantings})`).join(', ')}`
    : 'No sampler has a planting due for termination without an approved walk.',
);
await db.destroy();
