import { randomUUID } from 'node:crypto';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { createTestApp, csrfFromHtml, signInApi, signInPages, type TestApp, locationOf } from '../../helpers/app';
import { seasonOfDate, todayIso } from '../../../shared/registry/season';
import { duePlantings } from '../../../server/walks/db';
import { computeRegister, reportingYearOf } from '../../../server/registers/service';
import { DEMO_ORGANISATIONS } from '../../../seeds/demo-people';

// Nobody approves their own walk (README, "Walk review"): a clerk or admin who walked a field
// cannot approve or reject that walk; an admin may waive the rule for one walk, with a reason kept
// on the walk and in the register's provenance. Walks here are invented, on the demo registry.

const ORG1 = DEMO_ORGANISATIONS[0].id;
const ORDINARY = [84.5, 77.0, 91.5, 80.0, 73.5, 88.0, 79.0, 86.5, 82.0, 76.5];

let t: TestApp;
beforeEach(async () => {
  t = await createTestApp();
});
afterEach(async () => {
  await t.close();
});

async function duePlanting() {
  const due = (await duePlantings(t.db, ORG1, { season: seasonOfDate(todayIso()), today: todayIso() })).filter((p) => p.crop === 'cereal_rye');
  if (!due[0]) throw new Error('no due cereal rye planting in the demo registry');
  return due[0];
}

/** A walk recorded and submitted through the JSON API by `email`. */
async function walkBy(email: string) {
  const api = await signInApi(t.app, email);
  const id = randomUUID();
  const planting = await duePlanting();
  const plants = ORDINARY.map((lengthCm, i) => ({ stop: i + 1, lengthCm }));
  const res = await api.agent.post('/api/walks').set('X-CSRF-Token', api.csrf).send({ id, plantingId: planting.plantingId, walkedOn: todayIso(), plants });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  expect((await api.agent.post(`/api/walks/${id}/submit`).set('X-CSRF-Token', api.csrf)).status).toBe(200);
  return { id, planting, api };
}

const statusOf = async (id: string) => (await t.db('field_walks').where({ id }).first('status')).status as string;

describe('nobody approves their own walk', () => {
  it('answers 403 own_walk to the clerk who walked the field, for approve and reject; another reviewer may approve', async () => {
    const { id, api } = await walkBy('clerk@crowntip.test');
    const approve = await api.agent.post(`/api/walks/${id}/approve`).set('X-CSRF-Token', api.csrf);
    expect(approve.status).toBe(403);
    expect(approve.body.error.code).toBe('own_walk');
    const reject = await api.agent.post(`/api/walks/${id}/reject`).set('X-CSRF-Token', api.csrf).send({ reason: 'Walk again: measure the main shoot.' });
    expect(reject.status).toBe(403);
    expect(reject.body.error.code).toBe('own_walk');
    expect(await statusOf(id)).toBe('submitted');

    const admin = await signInApi(t.app, 'admin@crowntip.test');
    const ok = await admin.agent.post(`/api/walks/${id}/approve`).set('X-CSRF-Token', admin.csrf);
    expect(ok.status).toBe(200);
    expect(await statusOf(id)).toBe('approved');
  });

  it('replaces the buttons on the walk page, and refuses a posted form too', async () => {
    const { id } = await walkBy('clerk@crowntip.test');
    const clerk = await signInPages(t.app, 'clerk@crowntip.test');
    const page = await clerk.get(`/walks/${id}`);
    expect(page.text).toContain('Another reviewer must approve this walk');
    expect(page.text).not.toContain(`action="/walks/${id}/approve"`);
    expect(page.text).not.toContain(`action="/walks/${id}/reject"`);
    expect(page.text).not.toContain('own-review-waiver'); // a clerk cannot waive
    const posted = await clerk.post(`/walks/${id}/approve`).type('form').send({ _csrf: csrfFromHtml(page.text) });
    expect(posted.status).toBe(303);
    expect(await statusOf(id)).toBe('submitted');
    expect((await clerk.get(locationOf(posted))).text).toContain('Another reviewer must approve this walk');

    // Another reviewer sees the buttons.
    const admin = await signInPages(t.app, 'admin@crowntip.test');
    const seen = await admin.get(`/walks/${id}`);
    expect(seen.text).toContain(`action="/walks/${id}/approve"`);
    expect(seen.text).not.toContain('Another reviewer must approve this walk');
  });

  it('lets an admin waive the rule for one walk with a reason, kept on the walk and in the register', async () => {
    const { id, planting } = await walkBy('admin@crowntip.test');
    const api = await signInApi(t.app, 'admin@crowntip.test');
    expect((await api.agent.post(`/api/walks/${id}/approve`).set('X-CSRF-Token', api.csrf)).body.error.code).toBe('own_walk');

    // A clerk may not waive; a reason is required.
    const clerk = await signInApi(t.app, 'clerk@crowntip.test');
    const byClerk = await clerk.agent.post(`/api/walks/${id}/own-review-waiver`).set('X-CSRF-Token', clerk.csrf).send({ reason: 'Only one person in the office this week.' });
    expect(byClerk.status).toBe(403);
    const blank = await api.agent.post(`/api/walks/${id}/own-review-waiver`).set('X-CSRF-Token', api.csrf).send({ reason: ' ' });
    expect(blank.status).toBe(400);
    expect(blank.body.error.fields).toHaveProperty('reason');

    const page = await signInPages(t.app, 'admin@crowntip.test');
    const before = await page.get(`/walks/${id}`);
    expect(before.text).toContain('Another reviewer must approve this walk');
    const waived = await page.post(`/walks/${id}/own-review-waiver`).type('form').send({ _csrf: csrfFromHtml(before.text), reason: 'Only one person in the office this week.' });
    expect(waived.status).toBe(303);
    const stored = await t.db('field_walks').where({ id }).first('own_review_waiver_reason', 'own_review_waived_by');
    expect(stored.own_review_waiver_reason).toBe('Only one person in the office this week.');
    expect(stored.own_review_waived_by).toBe(api.user.id);

    const after = await page.get(`/walks/${id}`);
    expect(after.text).toContain('Only one person in the office this week.');
    expect(after.text).toContain(`action="/walks/${id}/approve"`);
    const ok = await api.agent.post(`/api/walks/${id}/approve`).set('X-CSRF-Token', api.csrf);
    expect(ok.status).toBe(200);
    expect(ok.body.ownReviewWaiver.reason).toBe('Only one person in the office this week.');

    const reg = (await computeRegister(t.db, ORG1, planting.ranchId, reportingYearOf(todayIso()), todayIso()))!;
    const row = reg.rows.find((r) => r.plantingId === planting.plantingId)!;
    expect(row.walk?.id).toBe(id);
    expect(row.walk?.ownReviewWaiver).toEqual({ byName: api.user.name, reason: 'Only one person in the office this week.' });
  });
});
