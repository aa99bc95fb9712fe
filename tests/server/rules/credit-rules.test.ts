import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import request from 'supertest';
import { createTestApp, csrfFromHtml, signInApi, signInPages, type TestApp } from '../../helpers/app';
import { lbPerAcToKgPerHa } from '../../../shared/calc/units';
import { DEMO_ORGANISATIONS } from '../../../seeds/demo-people';
import { creditRuleForYear, currentCreditRule } from '../../../server/rules/service';
import { insertRuleVersion } from '../../../server/rules/db';
import { todayIso } from '../../../shared/registry/season';

let t: TestApp;
beforeEach(async () => {
  t = await createTestApp();
});
afterEach(async () => {
  await t.close();
});

const ORG = DEMO_ORGANISATIONS[0].id;
const RULE = {
  thresholdKgHa: lbPerAcToKgPerHa(4000),
  minDaysInWindow: 75,
  window: { start: '11-01', end: '03-15' },
  eligibleCrops: ['cereal_rye', 'triticale'],
  creditKgNPerHa: 40,
  maxDaysSampleBeforeTermination: 21,
};

describe('rule versions', () => {
  it('the demo organisation starts with version 1, the usual 4,500 lb/ac and 90 days, marked demo', async () => {
    const rule = await currentCreditRule(t.db, ORG);
    expect(rule.version).toBe(1);
    expect(rule.isDemo).toBe(true);
    // 4,500 lb/ac × 0.45359237 kg/lb ÷ 0.40468564224 ha/ac = 5,043.83 kg/ha (exact NIST factors).
    expect(rule.thresholdKgHa).toBeCloseTo(5043.83, 2);
    expect(rule.minDaysInWindow).toBe(90);
  });

  it('a register year uses the version in effect on 1 January of that year', async () => {
    await insertRuleVersion(t.db, ORG, { ...RULE, effectiveFrom: '2027-01-01' }, null);
    await insertRuleVersion(t.db, ORG, { ...RULE, minDaysInWindow: 60, effectiveFrom: '2027-06-01' }, null);
    expect((await creditRuleForYear(t.db, ORG, 2026)).version).toBe(1);
    expect((await creditRuleForYear(t.db, ORG, 2027)).minDaysInWindow).toBe(75);
    expect((await creditRuleForYear(t.db, ORG, 2028)).minDaysInWindow).toBe(60);
    expect((await currentCreditRule(t.db, ORG, '2027-05-31')).version).toBe(2);
    expect((await currentCreditRule(t.db, ORG, '2027-06-01')).version).toBe(3);
  });
});

describe('PUT /api/rules/current', () => {
  it('saves a new version for an admin, leaving earlier ones', async () => {
    const { agent, csrf } = await signInApi(t.app, 'admin@crowntip.test');
    const res = await agent.put('/api/rules/current').set('X-CSRF-Token', csrf).send({ ...RULE, effectiveFrom: todayIso() });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ version: 2, minDaysInWindow: 75, window: RULE.window, isDemo: false });
    const versions = await agent.get('/api/rules/versions');
    expect(versions.body.total).toBe(2);
    // The other organisation's rule is untouched.
    const other = await currentCreditRule(t.db, DEMO_ORGANISATIONS[1].id);
    expect(other.version).toBe(1);
  });

  it('answers 401, 403 and 400 with fields', async () => {
    const anon = request.agent(t.app);
    const token = (await anon.get('/api/session')).body.csrfToken;
    expect((await anon.put('/api/rules/current').set('X-CSRF-Token', token).send(RULE)).status).toBe(401);
    const clerk = await signInApi(t.app, 'clerk@crowntip.test');
    expect((await clerk.agent.put('/api/rules/current').set('X-CSRF-Token', clerk.csrf).send(RULE)).status).toBe(403);
    const admin = await signInApi(t.app, 'admin@crowntip.test');
    const bad = await admin.agent
      .put('/api/rules/current')
      .set('X-CSRF-Token', admin.csrf)
      .send({ ...RULE, window: { start: '02-30', end: '13-01' }, eligibleCrops: [], thresholdKgHa: -1 });
    expect(bad.status).toBe(400);
    expect(bad.body.error.code).toBe('invalid');
    expect(Object.keys(bad.body.error.fields)).toEqual(expect.arrayContaining(['window.start', 'window.end', 'eligibleCrops', 'thresholdKgHa']));
  });
});

describe('the rule page', () => {
  it('shows the demo caution and saves a version entered in US units', async () => {
    const admin = await signInPages(t.app, 'admin@crowntip.test');
    const page = await admin.get('/admin/rules');
    expect(page.text).toContain('Confirm every value with the local authority');
    expect(page.text).toContain('demo values');
    const res = await admin.post('/admin/rules').type('form').send({
      _csrf: csrfFromHtml(page.text),
      threshold: '4000',
      minDaysInWindow: '80',
      windowStart: '10-15',
      windowEnd: '03-31',
      eligibleCrops: ['cereal_rye', 'barley'],
      credit: '45',
      maxDaysSampleBeforeTermination: '20',
      effectiveFrom: todayIso(), // a new version starts today or later (tests/server/rules/rule-back-dating.test.ts)
    });
    expect(res.status).toBe(302);
    const rule = await currentCreditRule(t.db, ORG);
    expect(rule.thresholdKgHa).toBeCloseTo(lbPerAcToKgPerHa(4000), 9);
    expect(rule.creditKgNPerHa).toBeCloseTo(lbPerAcToKgPerHa(45), 9);
    expect(rule.eligibleCrops).toEqual(['cereal_rye', 'barley']);
  });

  it('keeps what was typed and shows errors inline', async () => {
    const admin = await signInPages(t.app, 'admin@crowntip.test');
    const page = await admin.get('/admin/rules');
    const res = await admin.post('/admin/rules').type('form').send({
      _csrf: csrfFromHtml(page.text),
      threshold: 'lots',
      minDaysInWindow: '80',
      windowStart: '10-15',
      windowEnd: '3/31',
      credit: '45',
      maxDaysSampleBeforeTermination: '20',
    });
    expect(res.status).toBe(400);
    expect(res.text).toContain('value="lots"');
    expect(res.text).toMatch(/id="threshold-error"/);
    expect(res.text).toMatch(/id="windowEnd-error"/);
    expect(res.text).toMatch(/id="eligibleCrops-error"/);
  });

  it('is for admins only', async () => {
    const clerk = await signInPages(t.app, 'clerk@crowntip.test');
    expect((await clerk.get('/admin/rules')).status).toBe(403);
  });
});
