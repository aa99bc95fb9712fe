import type { Knex } from 'knex';
import type { Logger } from 'pino';
import type { Mailer } from '../mail/mailer';
import { todayIso } from '../../shared/registry/season';
import { sendSamplingReminders } from './service';

/**
 * Claims today's run of a job: true for the one caller whose insert succeeds. Several app servers
 * on one database therefore send each day's reminders once.
 */
export async function claimDailyRun(db: Knex, job: string, day: string): Promise<boolean> {
  try {
    await db('job_runs').insert({ job, run_on: day, started_at: new Date().toISOString() });
    return true;
  } catch {
    return false; // already claimed today (primary key)
  }
}

export async function finishRun(db: Knex, job: string, day: string, summary: unknown) {
  await db('job_runs').where({ job, run_on: day }).update({ finished_at: new Date().toISOString(), summary: JSON.stringify(summary) });
}

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
