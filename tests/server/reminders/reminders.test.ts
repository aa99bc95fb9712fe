import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { pino } from 'pino';
import { createTestApp, type TestApp } from '../../helpers/app';
import { createMailer } from '../../../server/mail/mailer';
import { runReminderJob } from '../../../server/reminders/daily';
import { DEMO_ORGANISATIONS, DEMO_USERS } from '../../../seeds/demo-people';
import { addDaysIso } from '../../../shared/registry/season';

let t: TestApp;
const TODAY = '2027-02-20';
const ORG = DEMO_ORGANISATIONS[0].id;
const userId = (email: string) => DEMO_USERS.find((u) => u.email === email)!.id;

beforeEach(async () => {
  t = await createTestApp();
  // A known starting point: no assignments, no walks, nothing planned for termination.
  await t.db('walk_assignments').del();
  await t.db('walk_plants').del();
  await t.db('walk_photos').del();
  await t.db('field_walks').del();
  await t.db('plantings').update({ planned_termination_on: null });
});
afterEach(async () => {
  await t.close();
});

async function plantingOf(fieldName: string) {
  return t.db('plantings').join('fields', 'fields.id', 'plantings.field_id').where('fields.name', fieldName).orderBy('plantings.season', 'desc').first('plantings.id', 'plantings.organisation_id');
}

function job() {
  const logger = pino({ level: 'silent' });
  return { db: t.db, mailer: createMailer(t.db, { from: 'Crowntip <x@crowntip.test>', logger }), logger, publicUrl: 'http://crowntip.test', daysAhead: 14 };
}

describe('sampling reminders', () => {
  it('e-mails each sampler the plantings due soon without an approved walk, once a day', async () => {
    const soon = await plantingOf('Bench 1');
    const walked = await plantingOf('Bench 2');
    const later = await plantingOf('Bench 3');
    await t.db('plantings').where('id', soon.id).update({ planned_termination_on: addDaysIso(TODAY, 5), terminated_on: null });
    await t.db('plantings').where('id', walked.id).update({ planned_termination_on: addDaysIso(TODAY, 3), terminated_on: null });
    await t.db('plantings').where('id', later.id).update({ planned_termination_on: addDaysIso(TODAY, 40), terminated_on: null });
    await t.db('field_walks').insert({
      id: '11111111-1111-4111-8111-111111111111',
      organisation_id: ORG,
      planting_id: walked.id,
      sampler_id: userId('sampler2@crowntip.test'),
      walked_on: TODAY,
      status: 'approved',
      content_hash: 'x',
      created_at: new Date().toISOString(),
    });
    // sampler@ is assigned only Bench 3 (not due); sampler2@ has no assignments, so sees all due.
    await t.db('walk_assignments').insert({ organisation_id: ORG, planting_id: later.id, sampler_id: userId('sampler@crowntip.test'), created_at: new Date().toISOString() });

    const result = await runReminderJob(job(), { today: TODAY });
    expect(result?.samplers).toEqual([{ email: 'sampler2@crowntip.test', plantings: 1 }]);
    const mail = await t.db('mail_outbox').where('to_address', 'sampler2@crowntip.test').first();
    expect(mail.subject).toBe('Crowntip: 1 field to walk before termination');
    expect(mail.text_body).toContain('Sandpiper Bench · Bench 1');
    expect(mail.text_body).not.toContain('Bench 2');
    expect(mail.text_body).toContain('http://crowntip.test/capture');

    // The daily job does not send twice on the same day; `npm run remind` (force) does.
    expect(await runReminderJob(job(), { today: TODAY })).toBeNull();
    expect(await t.db('mail_outbox').count({ n: '*' }).first()).toEqual({ n: 1 });
    await runReminderJob(job(), { today: TODAY, force: true });
    expect(await t.db('mail_outbox').count({ n: '*' }).first()).toEqual({ n: 2 });
  });

  it('sends nothing when nothing is due', async () => {
    const result = await runReminderJob(job(), { today: TODAY });
    expect(result).toEqual({ messages: 0, samplers: [] });
  });
});
