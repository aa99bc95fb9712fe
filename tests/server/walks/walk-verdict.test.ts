import { createHash, randomUUID } from 'node:crypto';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { createTestApp, signInApi, signInPages, type TestApp } from '../../helpers/app';
import { fitCalibration } from '../../../shared/calc';
import { seasonOfDate, todayIso } from '../../../shared/registry/season';
import { walkEstimateSchema, walkSchema } from '../../../shared/schemas/walks';
import { insertCalibration, insertDataset, markPublished, setAssignment } from '../../../server/calibrations/db';
import { duePlantings, insertWalk } from '../../../server/walks/db';
import { walkContentHash } from '../../../server/walks/service';
import { DEMO_ORGANISATIONS, DEMO_USERS } from '../../../seeds/demo-people';
import { at } from '../../helpers/lists';

/*
 * The verdict stored in a walk's estimate snapshot (README, "Verdicts" and "Field walks API").
 *
 * Hand-worked calibration (every step here, no product code): five invented pairs
 *   x = 20, 30, 40, 50, 60 cm;  y = 100·x + r with r = 0, +100, −200, +100, 0 kg/ha.
 * Σr = 0 and Σr·(x − 40) = 0·(−20) + 100·(−10) − 200·0 + 100·10 + 0·20 = 0, so least squares gives
 * exactly a = 0, b = 100 kg/ha per cm and residuals r: SSE = 100² + 200² + 100² = 60,000, ν_cal = 3,
 * s² = 20,000; Sxx = 400 + 100 + 0 + 100 + 400 = 1,000; leverage at mean length m: q = 1/5 + (m − 40)²/1,000.
 * The rule's threshold is set to 4,000 kg/ha (the curve reaches it at 40 cm).
 * Combined uncertainty (GUM 5.1.2): u_c² = s²·(1 + q) + b²·sd²/n. Every interval half-width is
 * k·u_c with z(0.95) = 1.6449 ≤ k ≤ t(0.95, 3) = 2.353 (ν_eff is at least the smaller of ν_cal = 3 and
 * n − 1 = 9; NIST/SEMATECH e-Handbook 1.3.6.7.1 and table 1.3.6.7.2), and a one-sided 90 % bound
 * uses z(0.90) = 1.2816 ≤ k' ≤ t(0.90, 3) = 1.638.
 *
 * - 10 plants alternating 54 and 56 cm: m = 55, sd² = 10/9; u_c² = 20,000·(1.2 + 0.225) + 100²·(10/9)/10
 *   = 28,500 + 1,111.1 = 29,611.1, u_c = 172.08; point 5,500; low end ≥ 5,500 − 2.353·172.08 = 5,095.1
 *   and one-sided bound ≥ 5,500 − 1.638·172.08 = 5,218.1: above 4,000 under every basis → meets.
 * - 10 plants alternating 24 and 26 cm: m = 25, same u_c (q equal at ±15 cm); point 2,500; high end
 *   ≤ 2,500 + 2.353·172.08 = 2,904.9 < 4,000 → below under every basis.
 * - 10 plants alternating 40 and 42 cm: m = 41, u_c² = 20,000·1.201 + 1,111.1 = 25,131.1, u_c = 158.53;
 *   point 4,100 ≥ 4,000 (point: meets); low end ≤ 4,100 − 1.6449·158.53 = 3,839.2 and one-sided bound
 *   ≤ 4,100 − 1.2816·158.53 = 3,896.8, both below 4,000 → borderline under the two interval bases.
 */

let t: TestApp;
beforeEach(async () => {
  t = await createTestApp();
});
afterEach(async () => {
  await t.close();
});

const ORG1 = DEMO_ORGANISATIONS[0].id;
const ADMIN = DEMO_USERS.find((u) => u.email === 'admin@crowntip.test')!.id;
type Client = Awaited<ReturnType<typeof signInApi>>;
const send = (c: Client, method: 'post' | 'put', p: string, body: object) => c.agent[method](p).set('X-CSRF-Token', c.csrf).send(body);

const alternate = (a: number, b: number, n = 10) => Array.from({ length: n }, (_, i) => (i % 2 ? b : a));
const MEETS = alternate(54, 56);
const BELOW = alternate(24, 26);
const NEAR = alternate(40, 42);

async function setup(rule: { decisionBasis: string; confidence?: number; minPlants?: number }) {
  const points = ([[20, 0], [30, 100], [40, -200], [50, 100], [60, 0]] as const).map(([x, off]) => ({ x, y: 100 * x + off }));
  const fit = fitCalibration(points, 'linear');
  const datasetId = await insertDataset(t.db, ORG1, { name: 'Hand-worked pairs', lengthUnit: 'cm', biomassUnit: 'kg_ha', points, uploadedBy: ADMIN });
  const id = await insertCalibration(t.db, ORG1, { datasetId, crop: 'cereal_rye', model: 'linear', fit, n: 5, xRange: fit.xRange, createdBy: ADMIN });
  await markPublished(t.db, ORG1, id, { model: 'linear', fit, version: 950, label: 'hand-worked', publishedBy: ADMIN });
  await setAssignment(t.db, ORG1, { crop: 'cereal_rye', variety: null, calibrationId: id, assignedBy: ADMIN });
  const admin = await signInApi(t.app, 'admin@crowntip.test');
  const saved = await send(admin, 'put', '/api/rules/current', {
    thresholdKgHa: 4000,
    minDaysInWindow: 90,
    window: { start: '10-01', end: '03-31' },
    eligibleCrops: ['cereal_rye'],
    creditKgNPerHa: 50,
    maxDaysSampleBeforeTermination: 30,
    effectiveFrom: todayIso(),
    confidence: 0.9,
    minPlants: 10,
    ...rule,
  });
  expect(saved.status, JSON.stringify(saved.body)).toBe(200);
  const planting = (await duePlantings(t.db, ORG1, { season: seasonOfDate(todayIso()), today: todayIso() })).find((p) => p.crop === 'cereal_rye')!;
  const sampler = await signInApi(t.app, 'sampler@crowntip.test');
  const walk = async (lengths: number[], extra: object = {}) => {
    const body = { id: randomUUID(), plantingId: planting.plantingId, walkedOn: todayIso(), plants: lengths.map((lengthCm, i) => ({ stop: i + 1, lengthCm })), ...extra };
    const res = await send(sampler, 'post', '/api/walks', body);
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    const estimate = await sampler.agent.get(`/api/walks/${res.body.id}/estimate`);
    expect(estimate.status).toBe(200);
    return { walk: walkSchema.parse(res.body), e: walkEstimateSchema.parse(estimate.body), body };
  };
  return { rule: saved.body as { id: string; version: number }, walk, sampler, planting };
}

describe('the verdict in the estimate snapshot', () => {
  it('point: meets, below, and meets near the threshold; the rule version and basis are stored', async () => {
    const { rule, walk } = await setup({ decisionBasis: 'point' });
    const meets = (await walk(MEETS)).e;
    expect(meets).toMatchObject({ verdict: 'meets', decisionBasis: 'point', confidence: 0.9, minPlants: 10, ruleVersionId: rule.id, ruleVersion: rule.version });
    expect(meets.biomassKgHa).toBeCloseTo(5500, 6);
    // Linear scale: the interval is symmetric about the point, half-width k·u_c with u_c = 172.08.
    const [lo, hi] = meets.combinedInterval!;
    expect((lo + hi) / 2).toBeCloseTo(5500, 6);
    expect((hi - lo) / 2 / 172.08).toBeGreaterThanOrEqual(1.6449);
    expect((hi - lo) / 2 / 172.08).toBeLessThanOrEqual(2.353);
    expect(meets.morePlants).toBeNull();
    expect(meets.note).toBeUndefined();
    expect((await walk(BELOW)).e.verdict).toBe('below');
    const near = (await walk(NEAR)).e;
    expect(near.verdict).toBe('meets');
    // Under `point` the interval across the threshold is a caution, not a reason.
    expect(near.verdictCautions?.map((c) => c.code)).toContain('interval_spans_threshold');
  });

  it('point_with_borderline: meets, below, and borderline when the range spans the threshold, with stated-power advice', async () => {
    const { walk } = await setup({ decisionBasis: 'point_with_borderline' });
    expect((await walk(MEETS)).e.verdict).toBe('meets');
    expect((await walk(BELOW)).e.verdict).toBe('below');
    const near = (await walk(NEAR)).e;
    expect(near).toMatchObject({ verdict: 'borderline', decisionBasis: 'point_with_borderline' });
    expect(near.verdictReasons?.map((r) => r.code)).toEqual(['point_meets', 'interval_spans_threshold']);
    expect(near.combinedInterval![0]).toBeLessThan(4000);
    expect(near.combinedInterval![1]).toBeGreaterThan(4000);
    expect(near.morePlants).not.toBeNull();
    expect(near.morePlantsSuggested).not.toBe(0);
  });

  it('lower_bound: meets only when the one-sided bound clears the threshold; otherwise borderline or below', async () => {
    const { walk } = await setup({ decisionBasis: 'lower_bound' });
    const meets = (await walk(MEETS)).e;
    expect(meets.verdict).toBe('meets');
    expect(meets.lowerBoundKgHa!).toBeGreaterThanOrEqual(5218.1 - 0.1);
    expect(meets.lowerBoundKgHa!).toBeLessThanOrEqual(5500 - 1.2816 * 172.08 + 0.1);
    expect((await walk(BELOW)).e.verdict).toBe('below');
    const near = (await walk(NEAR)).e;
    expect(near.verdict).toBe('borderline');
    expect(near.lowerBoundKgHa!).toBeLessThanOrEqual(3896.8);
    expect(near.verdictReasons?.[0]).toMatchObject({ code: 'lower_bound_below', thresholdKgHa: 4000, confidence: 0.9 });
  });

  it('fewer plants than the rule\'s minimum: borderline, too_few_plants, under every basis', async () => {
    for (const decisionBasis of ['point', 'point_with_borderline', 'lower_bound']) {
      await t.close();
      t = await createTestApp();
      const { walk } = await setup({ decisionBasis });
      const e = (await walk([54, 55, 56])).e;
      expect(e.verdict, decisionBasis).toBe('borderline');
      expect(e.verdictReasons?.[0]).toEqual({ code: 'too_few_plants', n: 3, minPlants: 10 });
      expect(e.morePlants).toMatchObject({ kind: 'reach_minimum', more: 7, minPlants: 10 });
    }
  });

  it('sd = 0 is never settled: no combined interval, borderline under an interval basis, never 0 more plants', async () => {
    const same = Array(10).fill(55);
    const { walk } = await setup({ decisionBasis: 'point_with_borderline' });
    const e = (await walk(same)).e;
    expect(e).toMatchObject({ verdict: 'borderline', combinedInterval: null, lowerBoundKgHa: null, sdLengthCm: 0 });
    expect(e.verdictReasons?.map((r) => r.code)).toContain('unknown_spread');
    expect(e.morePlants?.kind).toBe('spread_unknown');
    expect(e.morePlantsSuggested).not.toBe(0);

    await t.close();
    t = await createTestApp();
    const point = await setup({ decisionBasis: 'point' });
    const p = (await point.walk(same)).e;
    expect(p.verdict).toBe('meets');
    expect(p.verdictCautions?.map((c) => c.code)).toContain('unknown_spread');
    expect(p.morePlantsSuggested).toBeNull();
  });
});

describe('a snapshot stored before decision bases', () => {
  it('reads as meets/below from its stored meetsThreshold, basis point, labelled, and keeps its stored note', async () => {
    const planting = at(await duePlantings(t.db, ORG1, { season: seasonOfDate(todayIso()), today: todayIso() }), 0, 'due planting');
    const id = randomUUID();
    const old = {
      calibrationId: 'old-calibration', calibrationVersion: 3, n: 10, meanLengthCm: 80, biomassKgHa: 5200,
      interval: [3900, 6500], samplingRange: [4950, 5450], level: 0.9, thresholdKgHa: 5043.83,
      meetsThreshold: true, extrapolated: false, morePlantsSuggested: 0,
      note: 'Estimated 4,639 lb/ac; meets the 4,500 lb/ac threshold.',
    };
    await insertWalk(t.db, ORG1, {
      id, plantingId: planting.plantingId, samplerId: ADMIN, walkedOn: '2026-02-01', stage: null, notes: null,
      status: 'submitted', contentHash: 'x'.repeat(64), estimate: old as never, plants: [{ stop: 1, lengthCm: 80 }],
    });
    const clerk = await signInApi(t.app, 'clerk@crowntip.test');
    const e = (await clerk.agent.get(`/api/walks/${id}/estimate`)).body;
    expect(e).toMatchObject({ ...old, verdict: 'meets', decisionBasis: 'point', judgedBeforeDecisionBases: true });
    expect(e.combinedInterval).toBeUndefined();
    // Stored as it was: nothing written back.
    const row = await t.db('field_walks').where({ id }).first();
    expect(JSON.parse(row.estimate)).toEqual(old);

    const page = await (await signInPages(t.app, 'clerk@crowntip.test')).get(`/walks/${id}`);
    expect(page.text).toContain('Judged before decision bases existed');
    expect(page.text).toContain('Estimated 4,639 lb/ac; meets the 4,500 lb/ac threshold.');
    expect(page.text).toMatch(/Stored note/);
  });
});

describe('skipped stops', () => {
  it('are stored, returned ascending, part of the content hash, and shown on the walk page', async () => {
    const { walk, sampler } = await setup({ decisionBasis: 'point' });
    const lengths = MEETS.slice(0, 8);
    const plants = lengths.map((lengthCm, i) => ({ stop: [1, 2, 4, 5, 6, 8, 9, 10][i], lengthCm }));
    const first = await walk([], { plants, skippedStops: [7, 3] }).catch(() => null);
    expect(first).not.toBeNull();
    const { walk: stored, body } = first!;
    expect(stored.skippedStops).toEqual([3, 7]);
    expect((await sampler.agent.get(`/api/walks/${stored.id}`)).body.skippedStops).toEqual([3, 7]);
    // The same walk again (skips in another order): the stored one; other skips: a conflict.
    expect((await send(sampler, 'post', '/api/walks', { ...body, skippedStops: [3, 7] })).status).toBe(200);
    const other = await send(sampler, 'post', '/api/walks', { ...body, skippedStops: [3] });
    expect(other.status).toBe(409);
    const page = await (await signInPages(t.app, 'clerk@crowntip.test')).get(`/walks/${stored.id}`);
    expect(page.text).toContain('Stops skipped: 3, 7');
  });

  it('a walk without skips keeps the hash it had before skipped stops existed', () => {
    // The canonical JSON as walks were hashed before (server/walks/service.ts), written out by hand.
    const input = { id: randomUUID(), plantingId: 'p1', walkedOn: '2026-02-01', stage: 'Z31', notes: null, plants: [{ stop: 2, lengthCm: 70 }, { stop: 1, lengthCm: 80, lat: 36.2, lon: -134.9 }] };
    const before = createHash('sha256')
      .update('{"plantingId":"p1","walkedOn":"2026-02-01","stage":"Z31","notes":null,"plants":[[1,80,36.2,-134.9],[2,70,null,null]]}')
      .digest('hex');
    expect(walkContentHash(input)).toBe(before);
    expect(walkContentHash({ ...input, skippedStops: [] })).toBe(before);
    expect(walkContentHash({ ...input, skippedStops: [3] })).not.toBe(before);
  });

  it('a stop both measured and skipped is refused beside skippedStops', async () => {
    const { planting, sampler } = await setup({ decisionBasis: 'point' });
    const res = await send(sampler, 'post', '/api/walks', {
      id: randomUUID(), plantingId: planting.plantingId, walkedOn: todayIso(), plants: [{ stop: 1, lengthCm: 50 }, { stop: 2, lengthCm: 52 }], skippedStops: [2, 5],
    });
    expect(res.status).toBe(400);
    expect(res.body.error.fields.skippedStops).toBe('Stop 2 has a plant measured, so it was not skipped.');
  });
});
