import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { createTestApp, csrfFromHtml, signInPages, type TestApp } from '../../helpers/app';
import { DEMO_ORGANISATIONS, DEMO_USERS } from '../../../seeds/demo-people';
import { addDaysIso, todayIso } from '../../../shared/registry/season';

let t: TestApp;
const ORG = DEMO_ORGANISATIONS[0].id;
const SAMPLER = DEMO_USERS.find((u) => u.email === 'sampler@crowntip.test')!;

beforeEach(async () => {
  t = await createTestApp();
  await t.db('walk_assignments').del();
});
afterEach(async () => {
  await t.close();
});

async function form(email: string) {
  const agent = await signInPages(t.app, email);
  const page = await agent.get('/registry/season');
  return { agent, page, csrf: encodeURIComponent(csrfFromHtml(page.text)) };
}

async function twoPlantings() {
  return t.db('plantings').where('organisation_id', ORG).whereNull('terminated_on').orderBy('id').limit(2).pluck('id');
}

describe('assigning plantings from the office', () => {
  it('assigns several plantings at once with the rule’s latest walk date as the default due date', async () => {
    const today = todayIso();
    const [a, b] = await twoPlantings();
    // The rule in effect today: its maximum days between walk and termination (the demo seeds it).
    const rule = await t.db('credit_rules').where('organisation_id', ORG).where('effective_from', '<=', today).orderBy('effective_from', 'desc').orderBy('version', 'desc').first();
    const maxDays = Number(rule?.max_days_sample_before_termination ?? 30);
    // a: planned termination 60 days ahead → due 60 − maxDays days ahead; b: 5 days ahead → the
    // latest walk date is already past, so due today.
    await t.db('plantings').where('id', a).update({ planned_termination_on: addDaysIso(today, 60) });
    await t.db('plantings').where('id', b).update({ planned_termination_on: addDaysIso(today, 5) });
    const { agent, page, csrf } = await form('clerk@crowntip.test');
    expect(page.text).toContain('Assign selected');
    const res = await agent.post('/registry/season/assign').type('form').send(`_csrf=${csrf}&plantingIds=${a}&plantingIds=${b}&samplerId=${SAMPLER.id}&dueOn=`);
    expect(res.status).toBe(303);
    expect(res.headers.location).toContain('assigned=2');
    const rows = await t.db('walk_assignments').whereIn('planting_id', [a, b]).select('planting_id', 'sampler_id', 'due_on');
    const due = Object.fromEntries(rows.map((r) => [r.planting_id, String(r.due_on).slice(0, 10)]));
    expect(due[a]).toBe(addDaysIso(today, 60 - maxDays));
    expect(due[b]).toBe(today);

    // An explicit date wins, and assigning again does not duplicate.
    await agent.post('/registry/season/assign').type('form').send(`_csrf=${csrf}&plantingIds=${a}&samplerId=${SAMPLER.id}&dueOn=2020-01-15`);
    const again = await t.db('walk_assignments').where('planting_id', a);
    expect(again).toHaveLength(1);
    expect(String(again[0].due_on).slice(0, 10)).toBe('2020-01-15');

    // The per-sampler list shows it, overdue (2020 is past and the planting has no walk).
    const list = await agent.get('/registry/assignments');
    expect(list.status).toBe(200);
    expect(list.text).toContain(SAMPLER.name);
    expect(list.text).toMatch(/data-overdue>1 overdue/);
  });

  it('refuses an empty selection or a missing sampler (400), an auditor (403), and an unknown planting (404), changing nothing', async () => {
    const [a] = await twoPlantings();
    const { agent, csrf } = await form('clerk@crowntip.test');
    const none = await agent.post('/registry/season/assign').type('form').send(`_csrf=${csrf}&samplerId=${SAMPLER.id}`);
    expect(none.status).toBe(400);
    expect(none.text).toContain('Select at least one planting to assign.');
    const noSampler = await agent.post('/registry/season/assign').type('form').send(`_csrf=${csrf}&plantingIds=${a}`);
    expect(noSampler.status).toBe(400);
    expect(noSampler.text).toContain('Choose a sampler.');
    const unknown = await agent.post('/registry/season/assign').type('form').send(`_csrf=${csrf}&plantingIds=${a}&plantingIds=00000000-0000-4000-8000-000000000999&samplerId=${SAMPLER.id}`);
    expect(unknown.status).toBe(404);
    expect(await t.db('walk_assignments').count({ n: '*' }).first()).toEqual({ n: 0 });

    const auditor = await form('auditor@crowntip.test');
    expect(auditor.page.text).not.toContain('Assign selected');
    const refused = await auditor.agent.post('/registry/season/assign').type('form').send(`_csrf=${auditor.csrf}&plantingIds=${a}&samplerId=${SAMPLER.id}`);
    expect(refused.status).toBe(403);
    expect(await t.db('walk_assignments').count({ n: '*' }).first()).toEqual({ n: 0 });
  });
});
