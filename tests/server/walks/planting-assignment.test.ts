import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { createTestApp, csrfFromHtml, signInPages, type TestApp } from '../../helpers/app';
import { DEMO_ORGANISATIONS, DEMO_USERS } from '../../../seeds/demo-people';
import { addDaysIso, todayIso } from '../../../shared/registry/season';
import { date } from '../../../shared/format';

let t: TestApp;
const ORG = DEMO_ORGANISATIONS[0].id;
const OTHER_ORG = DEMO_ORGANISATIONS[1].id;
const SAMPLER = DEMO_USERS.find((u) => u.email === 'sampler@crowntip.test')!;

beforeEach(async () => {
  t = await createTestApp();
  await t.db('walk_assignments').del();
});
afterEach(async () => {
  await t.close();
});

async function openPlanting() {
  return (await t.db('plantings').where('organisation_id', ORG).whereNull('terminated_on').orderBy('id').first('id')).id as string;
}

/** The rule in effect today's maximum days between walk and termination (the demo seeds it). */
async function maxDays() {
  const today = todayIso();
  const rule = await t.db('credit_rules').where('organisation_id', ORG).where('effective_from', '<=', today).orderBy('effective_from', 'desc').orderBy('version', 'desc').first();
  return Number(rule?.max_days_sample_before_termination ?? 30);
}

describe('assigning a sampler from the planting itself', () => {
  it('offers the rule’s latest walk date as the due date, assigns, and takes the assignment back', async () => {
    const today = todayIso();
    const id = await openPlanting();
    // Planned termination 60 days ahead: the latest walk date is 60 − maxDays days ahead (planned
    // termination minus the rule's maximum days between walk and termination).
    await t.db('plantings').where({ id }).update({ planned_termination_on: addDaysIso(today, 60) });
    const expectedDue = addDaysIso(today, 60 - (await maxDays()));

    const clerk = await signInPages(t.app, 'clerk@crowntip.test');
    const page = await clerk.get(`/registry/plantings/${id}`);
    expect(page.status).toBe(200);
    expect(page.text).toContain('data-no-assignment');
    expect(page.text).toContain(`id="dueOn" name="dueOn" value="${expectedDue}"`);
    expect(page.text).toContain(`the rule’s latest walk date, ${date(expectedDue)}`);

    const res = await clerk.post(`/registry/plantings/${id}/assign`).type('form').send({ _csrf: csrfFromHtml(page.text), samplerId: SAMPLER.id, dueOn: expectedDue });
    expect(res.status).toBe(303);
    const rows = await t.db('walk_assignments').where({ planting_id: id });
    expect(rows).toHaveLength(1);
    expect(rows[0].sampler_id).toBe(SAMPLER.id);
    expect(String(rows[0].due_on).slice(0, 10)).toBe(expectedDue);

    const after = await clerk.get(`/registry/plantings/${id}`);
    expect(after.text).toContain(`<strong>${SAMPLER.name}</strong>, due by ${date(expectedDue)}`);

    // Taken back from the planting page.
    const removed = await clerk.post(`/registry/plantings/${id}/unassign`).type('form').send({ _csrf: csrfFromHtml(after.text), samplerId: SAMPLER.id });
    expect(removed.status).toBe(303);
    expect(await t.db('walk_assignments').where({ planting_id: id })).toHaveLength(0);
  });

  it('removes an assignment from the per-sampler list and returns there', async () => {
    const id = await openPlanting();
    await t.db('walk_assignments').insert({ organisation_id: ORG, planting_id: id, sampler_id: SAMPLER.id, due_on: '2027-03-01', created_by: null, created_at: new Date().toISOString() });
    const clerk = await signInPages(t.app, 'clerk@crowntip.test');
    const list = await clerk.get('/registry/assignments');
    expect(list.text).toContain(`action="/registry/plantings/${id}/unassign"`);
    const res = await clerk.post(`/registry/plantings/${id}/unassign`).type('form').send({ _csrf: csrfFromHtml(list.text), samplerId: SAMPLER.id, back: '/registry/assignments' });
    expect(res.status).toBe(303);
    expect(res.headers.location).toBe('/registry/assignments');
    expect(await t.db('walk_assignments').where({ planting_id: id })).toHaveLength(0);
  });

  it('says beside the field what is missing or wrong, and keeps what was typed', async () => {
    const id = await openPlanting();
    const clerk = await signInPages(t.app, 'clerk@crowntip.test');
    const page = await clerk.get(`/registry/plantings/${id}`);
    const res = await clerk.post(`/registry/plantings/${id}/assign`).type('form').send({ _csrf: csrfFromHtml(page.text), samplerId: '', dueOn: '2027-02-30' });
    expect(res.status).toBe(400);
    expect(res.text).toContain('id="samplerId-error">Choose the sampler who should walk this planting.</p>');
    expect(res.text).toContain('id="dueOn-error">Use a date written YYYY-MM-DD.</p>');
    expect(res.text).toContain('value="2027-02-30"');
    // A user who may not be asked to walk (the auditor) is refused beside the sampler field.
    const auditor = DEMO_USERS.find((u) => u.email === 'auditor@crowntip.test')!;
    const wrong = await clerk.post(`/registry/plantings/${id}/assign`).type('form').send({ _csrf: csrfFromHtml(page.text), samplerId: auditor.id, dueOn: '' });
    expect(wrong.status).toBe(400);
    expect(wrong.text).toContain('id="samplerId-error">Choose an active sampler of your organisation.</p>');
    expect(await t.db('walk_assignments').where({ planting_id: id })).toHaveLength(0);
  });

  it('lets only admins and clerks assign; others read the page; other organisations’ plantings are not found', async () => {
    const id = await openPlanting();
    for (const email of ['auditor@crowntip.test', 'sampler@crowntip.test']) {
      const agent = await signInPages(t.app, email);
      const page = await agent.get(`/registry/plantings/${id}`);
      expect(page.status).toBe(200);
      expect(page.text).not.toContain(`action="/registry/plantings/${id}/assign"`);
      const res = await agent.post(`/registry/plantings/${id}/assign`).type('form').send({ _csrf: csrfFromHtml(page.text), samplerId: SAMPLER.id });
      expect(res.status).toBe(403);
      const un = await agent.post(`/registry/plantings/${id}/unassign`).type('form').send({ _csrf: csrfFromHtml(page.text), samplerId: SAMPLER.id });
      expect(un.status).toBe(403);
    }
    const other = (await t.db('plantings').where('organisation_id', OTHER_ORG).first('id')).id as string;
    const clerk = await signInPages(t.app, 'clerk@crowntip.test');
    expect((await clerk.get(`/registry/plantings/${other}`)).status).toBe(404);
    const page = await clerk.get(`/registry/plantings/${id}`);
    const res = await clerk.post(`/registry/plantings/${other}/assign`).type('form').send({ _csrf: csrfFromHtml(page.text), samplerId: SAMPLER.id });
    expect(res.status).toBe(404);
    expect(await t.db('walk_assignments').where({ planting_id: other })).toHaveLength(0);
  });
});
