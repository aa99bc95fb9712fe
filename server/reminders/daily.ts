import type { Knex } from 'knex';
import type { Logger } from 'pino';
import type { Mailer } from '../mail/public';
import type { JobQueue } from '../platform/jobs';
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

export const DAILY_REMINDERS = 'daily-reminders';

/** Lets this server send a day's reminders when the queue hands it that day's job. */
export function defineReminderJob(jobs: JobQueue, opts: ReminderJobOptions) {
  jobs.define<{ day: string }, never, Awaited<ReturnType<typeof runReminderJob>>>(DAILY_REMINDERS, ({ payload }) => runReminderJob(opts, { today: payload.day }), {
    retries: 2,
    retryDelaySeconds: 60,
    timeoutSeconds: 10 * 60,
  });
}

/**
 * Queues the day's reminders. The job's key is held for ever once the job is done, so however many
 * servers ask, and however often, one job per day is made (the job_runs claim inside
 * runReminderJob is a second guard); a failed day lets go of its key and is asked for again.
 */
export function enqueueDailyReminders(jobs: JobQueue, day = todayIso()) {
  return jobs.enqueue(DAILY_REMINDERS, { day }, { key: `${DAILY_REMINDERS}:${day}`, keyHeld: 'forever' });
}

/**
 * Every hour, asks the queue for today's reminders (the first ask a minute after start); any
 * server of the install may run them.
 */
export function scheduleDailyJobs(opts: ReminderJobOptions & { jobs: JobQueue }): () => void {
  defineReminderJob(opts.jobs, opts);
  const tick = () => void enqueueDailyReminders(opts.jobs).catch((err) => opts.logger.error({ err }, 'reminder job could not be queued'));
  const first = setTimeout(tick, 60_000);
  const every = setInterval(tick, 3_600_000);
  first.unref();
  every.unref();
  return () => {
    clearTimeout(first);
    clearInterval(every);
  };
}
