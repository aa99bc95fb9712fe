import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { createTestApp, csrfFromHtml, signInApi, signInPages, type TestApp } from '../../helpers/app';
import { DEMO_ORGANISATIONS } from '../../../seeds/demo-people';
import { creditRuleInEffectSchema } from '../../../shared/schemas/rules';
import { currentCreditRule } from '../../../server/rules/service';
import { insertRuleVersion } from '../../../server/rules/db';
import { todayIso } from '../../../shared/registry/season';

/*
 * How a credit rule decides a walk's verdict: decision basis, confidence, minimum plants, and the
 * walk plan's edge margin, stored with each version. Expected values are the brief's demo choice
 * (point_with_borderline at 90 %, 10 plants, 10 m margin) and unit conversions by the exact
 * international foot (0.3048 m, NIST SP 811 B.9).
 */

let t: TestApp;
beforeEach(async () => {
  t = await createTestApp();
});
afterEach(async () => {
  await t.close();
});

const ORG = DEMO_ORGANISATIONS[0].id;
const RULE = {
  thresholdKgHa: 5000,
  minDaysInWindow: 75,
  window: { start: '11-01', end: '03-15' },
  eligibleCrops: ['cereal_rye'],
  creditKgNPerHa: 40,
  maxDaysSampleBeforeTermination: 21,
};

const form = {
  threshold: '4000',
  minDaysInWindow: '80',
  windowStart: '10-15',
  windowEnd: '03-31',
  eligibleCrops: ['cereal_rye'],
  credit: '45',
  maxDaysSampleBeforeTermination: '20',
  effectiveFrom: todayIso(),
};

describe('decision basis on the rule', () => {
  it('the demo rule judges by the point estimate with a borderline band at 90 %, 10 plants, 10 m margin; GET /api/rules/current says so', async () => {
    const { agent } = await signInApi(t.app, 'sampler@crowntip.test');
    const res = await agent.get('/api/rules/current');
    expect(res.status).toBe(200);
    expect(creditRuleInEffectSchema.safeParse(res.body).success).toBe(true);
    expect(res.body).toMatchObject({ decisionBasis: 'point_with_borderline', confidence: 0.9, minPlants: 10, edgeMarginM: 10 });
  });

  it('a version saved without the new fields (before they existed) reads as the point estimate, 90 %, 1 plant, 10 m', async () => {
    const v = await insertRuleVersion(t.db, ORG, { ...RULE, effectiveFrom: '2026-01-01' }, null);
    expect(v).toMatchObject({ decisionBasis: 'point', confidence: 0.9, minPlants: 1, edgeMarginM: 10 });
  });

  it('PUT keeps the version in effect\'s choice when the fields are left out, and stores them when given', async () => {
    const { agent, csrf } = await signInApi(t.app, 'admin@crowntip.test');
    const kept = await agent.put('/api/rules/current').set('X-CSRF-Token', csrf).send({ ...RULE, effectiveFrom: todayIso() });
    expect(kept.body).toMatchObject({ version: 2, decisionBasis: 'point_with_borderline', confidence: 0.9, minPlants: 10 });
    const set = await agent
      .put('/api/rules/current')
      .set('X-CSRF-Token', csrf)
      // Same day as version 2: the higher version wins (server/rules/db.ts, ruleInEffect).
      .send({ ...RULE, effectiveFrom: todayIso(), decisionBasis: 'lower_bound', confidence: 0.95, minPlants: 12, edgeMarginM: 15 });
    expect(set.status).toBe(200);
    expect(set.body).toMatchObject({ version: 3, decisionBasis: 'lower_bound', confidence: 0.95, minPlants: 12, edgeMarginM: 15 });
  });

  it('PUT answers 400 with the field for a bad basis, confidence, minimum or margin', async () => {
    const { agent, csrf } = await signInApi(t.app, 'admin@crowntip.test');
    const bad = await agent
      .put('/api/rules/current')
      .set('X-CSRF-Token', csrf)
      .send({ ...RULE, decisionBasis: 'majority_vote', confidence: 90, minPlants: 0, edgeMarginM: -1 });
    expect(bad.status).toBe(400);
    expect(Object.keys(bad.body.error.fields)).toEqual(expect.arrayContaining(['decisionBasis', 'confidence', 'minPlants', 'edgeMarginM']));
  });
});

describe('the rule page', () => {
  it('shows each basis in plain words with the local authority caution, and saves a new version from a percentage and feet', async () => {
    const admin = await signInPages(t.app, 'admin@crowntip.test');
    const page = await admin.get('/admin/rules');
    expect(page.text).toContain('Agree the choice of decision basis with the local authority');
    for (const basis of ['point', 'lower_bound', 'point_with_borderline']) expect(page.text).toContain(`name="decisionBasis" value="${basis}"`);
    expect(page.text).toMatch(/value="point_with_borderline"\s+checked/);
    expect(page.text).toContain('Safest for the water');
    const res = await admin.post('/admin/rules').type('form').send({
      ...form,
      _csrf: csrfFromHtml(page.text),
      decisionBasis: 'lower_bound',
      confidence: '95',
      minPlants: '12',
      edgeMargin: '50', // ft: the demo admin reads US units; 50 ft × 0.3048 = 15.24 m
    });
    expect(res.status).toBe(302);
    const rule = await currentCreditRule(t.db, ORG);
    expect(rule).toMatchObject({ decisionBasis: 'lower_bound', minPlants: 12 });
    expect(rule.confidence).toBeCloseTo(0.95, 12);
    expect(rule.edgeMarginM).toBeCloseTo(15.24, 9);
  });

  it('answers 400 with plain words beside the field for a bad basis or confidence, keeping what was typed', async () => {
    const admin = await signInPages(t.app, 'admin@crowntip.test');
    const page = await admin.get('/admin/rules');
    const res = await admin.post('/admin/rules').type('form').send({
      ...form,
      _csrf: csrfFromHtml(page.text),
      decisionBasis: 'coin_toss',
      confidence: '0.9', // a fraction typed where the form asks for a percentage: 0.9 % is below 50 %
      minPlants: '10',
      edgeMargin: '30',
    });
    expect(res.status).toBe(400);
    expect(res.text).toMatch(/id="decisionBasis-error">Choose one of the three ways of deciding the verdict\./);
    expect(res.text).toMatch(/id="confidence-error">Enter the confidence as a percentage from 50 to 99\.5, e\.g\. 90\./);
    expect(res.text).toContain('value="0.9"');
    expect((await currentCreditRule(t.db, ORG)).version).toBe(1);
  });
});
