import type { Knex } from 'knex';
import type { Logger } from 'pino';
import type { Mailer } from '../mail/public';
import { todayIso } from '../../shared/registry/season';
import { sendSamplingReminders } from './service';
import { claimDailyRun, finishRun } from './db';

export interface ReminderJobOptions {
  db: Knex;
  mailer: Mailer;
  logger: Logger;
  publicUrl: string;
  daysAhead: number;
}

export async function runReminderJob(opts: ReminderJobOptions, { force = false, today = todayIso() } = {}) {
  const claimed = await claimDailyRun(opts.db, 'sampling-reminders', today);
  if (!claimed && !force) return null;
  const result = await sendSamplingReminders(opts.db, opts.mailer, { today, daysAhead: opts.daysAhead, publicUrl: opts.publicUrl });
  if (claimed) await finishRun(opts.db, 'sampling-reminders', today, result);
  opts.logger.info(result, 'sampling reminders sent');
  return result;
}

/** Checks every hour whether today's reminders went out; the first check runs a minute after start. */
export function scheduleDailyJobs(opts: ReminderJobOptions): () => void {
  const tick = () => void runReminderJob(opts).catch((err) => opts.logger.error({ err }, 'reminder job failed'));
  const first = setTimeout(tick, 60_000);
  const every = setInterval(tick, 3_600_000);
  first.unref();
  every.unref();
  return () => {
    clearTimeout(first);
    clearInterval(every);
  };
}
