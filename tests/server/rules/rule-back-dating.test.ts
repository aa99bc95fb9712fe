import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { createTestApp, csrfFromHtml, signInApi, signInPages, type TestApp } from '../../helpers/app';
import { DEMO_ORGANISATIONS } from '../../../seeds/demo-people';
import { addDaysIso, todayIso } from '../../../shared/registry/season';

// A new credit rule version may not start in the past: a back-dated version would silently change
// the drafts of years already reported (a register for year Y uses the version in effect on 1 January
// of Y). Today or later is accepted; earlier is refused beside the date, in plain words.

const ORG = DEMO_ORGANISATIONS[0].id;
const RULE = {
  thresholdKgHa: 4500,
  minDaysInWindow: 75,
  window: { start: '11-01', end: '03-15' },
  eligibleCrops: ['cereal_rye'],
  creditKgNPerHa: 40,
  maxDaysSampleBeforeTermination: 21,
};

let t: TestApp;
beforeEach(async () => {
  t = await createTestApp();
});
afterEach(async () => {
  await t.close();
});

describe('back-dated credit rule versions', () => {
  it('the API refuses 2020-01-01 and yesterday beside effectiveFrom, and accepts today and later', async () => {
    const { agent, csrf } = await signInApi(t.app, 'admin@crowntip.test');
    for (const effectiveFrom of ['2020-01-01', addDaysIso(todayIso(), -1)]) {
      const res = await agent.put('/api/rules/current').set('X-CSRF-Token', csrf).send({ ...RULE, effectiveFrom });
      expect(res.status, effectiveFrom).toBe(400);
      expect(res.body.error.code).toBe('invalid');
      expect(res.body.error.fields.effectiveFrom).toMatch(/cannot start in the past/);
    }
    expect(await t.db('credit_rules').where('organisation_id', ORG)).toHaveLength(1);
    const today = await agent.put('/api/rules/current').set('X-CSRF-Token', csrf).send({ ...RULE, effectiveFrom: todayIso() });
    expect(today.status, JSON.stringify(today.body)).toBe(200);
    const later = await agent.put('/api/rules/current').set('X-CSRF-Token', csrf).send({ ...RULE, effectiveFrom: addDaysIso(todayIso(), 30) });
    expect(later.status, JSON.stringify(later.body)).toBe(200);
  });

  it('the rule page shows the message beside the date and keeps what was typed', async () => {
    const admin = await signInPages(t.app, 'admin@crowntip.test');
    const page = await admin.get('/admin/rules');
    const res = await admin.post('/admin/rules').type('form').send({
      _csrf: csrfFromHtml(page.text),
      threshold: '4000',
      minDaysInWindow: '80',
      windowStart: '10-15',
      windowEnd: '03-31',
      eligibleCrops: ['cereal_rye'],
      credit: '45',
      maxDaysSampleBeforeTermination: '20',
      effectiveFrom: '2020-01-01',
    });
    expect(res.status).toBe(400);
    expect(res.text).toMatch(/id="effectiveFrom-error"[^>]*>[^<]*cannot start in the past/);
    expect(res.text).toContain('value="2020-01-01"');
    expect(await t.db('credit_rules').where('organisation_id', ORG)).toHaveLength(1);
  });
});
