import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { pino } from 'pino';
import { createTestApp, type TestApp } from '../../helpers/app';
import { createMailer } from '../../../server/mail/mailer';
import { defineReminderJob, enqueueDailyReminders } from '../../../server/reminders/daily';
import { addDaysIso } from '../../../shared/registry/season';
import { at } from '../../helpers/lists';

/*
 * The daily reminder on two app servers at once (one database; pg-boss in the postgres project):
 * both ask for the day's reminders, several times, and each sampler gets one e-mail that day.
 */
const TODAY = '2027-02-20';
let a: TestApp;
let b: TestApp;

beforeEach(async () => {
  a = await createTestApp();
  b = await createTestApp({}, { sameDatabaseAs: a });
  // One planting due in 5 days without a walk and no assignments: both demo samplers are told.
  await a.db('walk_assignments').del();
  await a.db('walk_plants').del();
  await a.db('walk_photos').del();
  await a.db('field_walks').del();
  await a.db('plantings').update({ planned_termination_on: null });
  const bench = await a.db('plantings').join('fields', 'fields.id', 'plantings.field_id').where('fields.name', 'Bench 1').orderBy('plantings.season', 'desc').first('plantings.id');
  await a.db('plantings').where('id', bench.id).update({ planned_termination_on: addDaysIso(TODAY, 5), terminated_on: null });
});
afterEach(async () => {
  await b.close();
  await a.close();
});

const reminderOptions = (t: TestApp) => {
  const logger = pino({ level: 'silent' });
  return { db: t.db, mailer: createMailer(t.db, { from: 'Crowntip <x@crowntip.test>', logger }), logger, publicUrl: 'http://crowntip.test', daysAhead: 14 };
};

describe('the daily reminder on two servers', () => {
  it('sends one e-mail per sampler however many times both servers ask for the day', async () => {
    defineReminderJob(a.jobs, reminderOptions(a));
    defineReminderJob(b.jobs, reminderOptions(b));
    await Promise.all([a.jobs.start(), b.jobs.start()]);
    const asks = await Promise.all([a, b, a, b, a, b].map((s) => enqueueDailyReminders(s.jobs, TODAY)));
    expect(asks.filter((x) => x.created)).toHaveLength(1);
    const job = await b.jobs.waitFor<unknown, unknown, { messages: number }>(at(asks, 0).id, null, 20_000);
    expect(job).toMatchObject({ state: 'done', result: { messages: 2 } });
    // Later in the day, from either server: nothing new.
    expect((await enqueueDailyReminders(a.jobs, TODAY)).created).toBe(false);
    const mails = await a.db('mail_outbox').orderBy('to_address').select('to_address', 'subject');
    expect(mails).toEqual([
      { to_address: 'sampler2@crowntip.test', subject: 'Crowntip: 1 field to walk before termination' },
      { to_address: 'sampler@crowntip.test', subject: 'Crowntip: 1 field to walk before termination' },
    ]);
    // The next day is a new job.
    expect((await enqueueDailyReminders(b.jobs, addDaysIso(TODAY, 1))).created).toBe(true);
  });
});
