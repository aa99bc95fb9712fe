import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { pino } from 'pino';
import { createTestApp, type TestApp } from '../../helpers/app';
import { createMailer } from '../../../server/mail/mailer';
import { dueForReminder, sendSamplingReminders } from '../../../server/reminders/service';
import { DEMO_ORGANISATIONS, DEMO_USERS } from '../../../seeds/demo-people';

/*
 * Reminders follow the due date a clerk gave an assignment. Today 2027-02-20, 14 days ahead:
 * reminded of what is due by 2027-03-06, overdue included; an assignment without a due date falls
 * back to planned termination within the 14 days.
 */
let t: TestApp;
const TODAY = '2027-02-20';
const ORG = DEMO_ORGANISATIONS[0].id;
const userId = (email: string) => DEMO_USERS.find((u) => u.email === email)!.id;
const SAMPLER = userId('sampler@crowntip.test');

beforeEach(async () => {
  t = await createTestApp();
  await t.db('walk_assignments').del();
  await t.db('walk_plants').del();
  await t.db('walk_photos').del();
  await t.db('field_walks').del();
  await t.db('plantings').update({ planned_termination_on: null });
});
afterEach(async () => {
  await t.close();
});

async function planting(fieldName: string, plannedTerminationOn: string | null, terminatedOn: string | null = null) {
  const p = await t.db('plantings').join('fields', 'fields.id', 'plantings.field_id').where('fields.name', fieldName).where('plantings.organisation_id', ORG).orderBy('plantings.season', 'desc').first('plantings.id');
  await t.db('plantings').where('id', p.id).update({ planned_termination_on: plannedTerminationOn, terminated_on: terminatedOn });
  return p.id as string;
}
const assign = (plantingId: string, dueOn: string | null) =>
  t.db('walk_assignments').insert({ organisation_id: ORG, planting_id: plantingId, sampler_id: SAMPLER, due_on: dueOn, created_at: new Date().toISOString() });

describe('reminders use the assignment’s due date', () => {
  it('reminds of what is due or overdue, not of what is due later, soonest first', async () => {
    const dueSoon = await planting('Bench 1', '2027-04-30'); // due Mar 1: within 14 days, termination far off
    const overdue = await planting('Bench 2', '2027-05-15'); // due Feb 10: overdue
    const dueLater = await planting('Bench 3', '2027-03-01'); // due Apr 1: later, though termination is near
    const noDate = await planting('Bench 4', '2027-03-02'); // no due date: planned termination within 14 days
    const ended = await planting('Bench 5', '2027-03-01', '2027-02-15'); // terminated already
    await assign(dueSoon, '2027-03-01');
    await assign(overdue, '2027-02-10');
    await assign(dueLater, '2027-04-01');
    await assign(noDate, null);
    await assign(ended, '2027-02-25');

    const due = await dueForReminder(t.db, TODAY, 14);
    const mine = due.find((d) => d.sampler.id === SAMPLER)!;
    expect(mine.items.map((i) => i.plantingId)).toEqual([overdue, dueSoon, noDate]);

    const logger = pino({ level: 'silent' });
    await sendSamplingReminders(t.db, createMailer(t.db, { from: 'Crowntip <x@crowntip.test>', logger }), { today: TODAY, daysAhead: 14, publicUrl: 'http://crowntip.test' });
    const mail = await t.db('mail_outbox').where('to_address', 'sampler@crowntip.test').first();
    expect(mail.text_body).toContain('· Bench 2 (');
    expect(mail.text_body).toContain('overdue: it was due by Feb 10, 2027; termination planned May 15, 2027');
    expect(mail.text_body).toContain('walk by Mar 1, 2027; termination planned Apr 30, 2027');
    expect(mail.text_body).toContain('· Bench 4 (');
    expect(mail.text_body).not.toContain('Bench 3');
    expect(mail.text_body).not.toContain('Bench 5');
    expect(mail.text_body).not.toMatch(/\d{4}-\d\d-\d\d/); // dates in words, never raw ISO
  });

  it('an approved walk ends the reminders; a submitted one does not yet', async () => {
    const a = await planting('Bench 1', null);
    const b = await planting('Bench 2', null);
    await assign(a, '2027-02-25');
    await assign(b, '2027-02-25');
    const walk = (id: string, plantingId: string, status: string) =>
      t.db('field_walks').insert({ id, organisation_id: ORG, planting_id: plantingId, sampler_id: SAMPLER, walked_on: TODAY, status, content_hash: 'x', created_at: new Date().toISOString() });
    await walk('11111111-1111-4111-8111-111111111111', a, 'approved');
    await walk('22222222-2222-4222-8222-222222222222', b, 'submitted');
    const mine = (await dueForReminder(t.db, TODAY, 14)).find((d) => d.sampler.id === SAMPLER)!;
    expect(mine.items.map((i) => i.plantingId)).toEqual([b]);
  });
});
