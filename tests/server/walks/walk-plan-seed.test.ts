import { randomUUID } from 'node:crypto';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { createTestApp, signInApi, signInPages, type TestApp } from '../../helpers/app';
import { seasonOfDate, todayIso } from '../../../shared/registry/season';
import { walkPlan } from '../../../shared/calc/walk-plan';
import { walkSchema } from '../../../shared/schemas/walks';
import { duePlantings } from '../../../server/walks/db';
import { insertRuleVersion } from '../../../server/rules/db';
import { DEMO_ORGANISATIONS } from '../../../seeds/demo-people';
import { at } from '../../helpers/lists';

// The walk plan kept with a walk (seed, stop count, the rule's edge margin) and the office walk
// page that draws the planned stops again. The reference for the page is the walk plan itself
// (shared/calc/walk-plan.ts, checked against JSTS and geographiclib in tests/shared): the page must
// show exactly the stops it gives for the stored seed, boundary, margin and count.

const ORG1 = DEMO_ORGANISATIONS[0].id;
let t: TestApp;
beforeEach(async () => {
  t = await createTestApp();
});
afterEach(async () => {
  await t.close();
});

type Client = Awaited<ReturnType<typeof signInApi>>;
const post = (c: Client, p: string, body: unknown = {}) => c.agent.post(p).set('X-CSRF-Token', c.csrf).send(body as object);

async function planting(withBoundary: boolean) {
  const due = await duePlantings(t.db, ORG1, { season: seasonOfDate(todayIso()), today: todayIso() });
  const p = due.find((d) => d.crop === 'cereal_rye' && Boolean(d.boundary) === withBoundary) ?? due.find((d) => Boolean(d.boundary) === withBoundary);
  if (!p) throw new Error(`no due planting ${withBoundary ? 'with' : 'without'} a boundary in the demo registry`);
  return p;
}

function body(plantingId: string, extra: Record<string, unknown> = {}) {
  return {
    id: randomUUID(),
    plantingId,
    walkedOn: todayIso(),
    plants: [81.5, 77, 88.5, 72, 84, 79.5, 90, 75.5, 83, 78].map((lengthCm, i) => ({ stop: i + 1, lengthCm, lat: 36.2 + i * 0.0001, lon: -134.9 })),
    ...extra,
  };
}

describe('the plan seed stored with a walk', () => {
  it('keeps the seed, the stop count and the rule’s margin, and answers them', async () => {
    const sampler = await signInApi(t.app, 'sampler@crowntip.test');
    const p = await planting(true);
    const res = await post(sampler, '/api/walks', body(p.plantingId, { planSeed: 'k3v9q0z1m2x8', planStops: 12, skippedStops: [11] }));
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(walkSchema.safeParse(res.body).success).toBe(true);
    // 10 m: the demo rule's edge margin (tests/server/rules/decision-basis.test.ts).
    expect(res.body.plan).toEqual({ seed: 'k3v9q0z1m2x8', stops: 12, edgeMarginM: 10 });
    const read = await sampler.agent.get(`/api/walks/${res.body.id}`);
    expect(read.body.plan).toEqual({ seed: 'k3v9q0z1m2x8', stops: 12, edgeMarginM: 10 });
  });

  it('never changes it: a re-post with another seed answers the stored walk; submit and approve keep it', async () => {
    const sampler = await signInApi(t.app, 'sampler@crowntip.test');
    const clerk = await signInApi(t.app, 'clerk@crowntip.test');
    const p = await planting(true);
    const first = body(p.plantingId, { planSeed: 'first-seed', planStops: 10 });
    expect((await post(sampler, '/api/walks', first)).status).toBe(201);
    const again = await post(sampler, '/api/walks', { ...first, planSeed: 'other-seed', planStops: 14 });
    expect(again.status).toBe(200);
    expect(again.body.plan.seed).toBe('first-seed');
    expect((await post(sampler, `/api/walks/${first.id}/submit`)).body.plan.seed).toBe('first-seed');
    const approved = await post(clerk, `/api/walks/${first.id}/approve`);
    expect(approved.status).toBe(200);
    expect(approved.body.plan).toEqual({ seed: 'first-seed', stops: 10, edgeMarginM: 10 });
  });

  it('a walk sent without a seed has no plan; one from a phone that sends no count takes its highest stop', async () => {
    const sampler = await signInApi(t.app, 'sampler@crowntip.test');
    const p = await planting(true);
    expect((await post(sampler, '/api/walks', body(p.plantingId))).body.plan).toBeNull();
    const old = await post(sampler, '/api/walks', body(p.plantingId, { planSeed: 'abc', skippedStops: [13] }));
    expect(old.body.plan).toEqual({ seed: 'abc', stops: 13, edgeMarginM: 10 });
  });

  it('refuses a bad seed or count with 400 naming the field', async () => {
    const sampler = await signInApi(t.app, 'sampler@crowntip.test');
    const p = await planting(true);
    for (const [extra, field] of [
      [{ planSeed: '' }, 'planSeed'],
      [{ planSeed: 'x'.repeat(65) }, 'planSeed'],
      [{ planSeed: 42 }, 'planSeed'],
      [{ planSeed: 'abc', planStops: 0 }, 'planStops'],
      [{ planSeed: 'abc', planStops: 2.5 }, 'planStops'],
      [{ planSeed: 'abc', planStops: 101 }, 'planStops'],
      // Stop 10 was measured, so a plan of 9 stops cannot be the one walked.
      [{ planSeed: 'abc', planStops: 9 }, 'planStops'],
    ] as const) {
      const res = await post(sampler, '/api/walks', body(p.plantingId, extra));
      expect(res.status, JSON.stringify(extra)).toBe(400);
      expect(Object.keys(res.body.error.fields ?? {}), JSON.stringify(extra)).toContain(field);
    }
    expect(await t.db('field_walks').whereNotNull('plan_seed').count({ n: '*' }).first()).toMatchObject({ n: 0 });
  });

  it('stores the margin of the rule in effect when the walk arrives', async () => {
    await insertRuleVersion(
      t.db,
      ORG1,
      { thresholdKgHa: 5000, minDaysInWindow: 75, window: { start: '11-01', end: '03-15' }, eligibleCrops: ['cereal_rye'], creditKgNPerHa: 40, maxDaysSampleBeforeTermination: 21, effectiveFrom: todayIso(), edgeMarginM: 15 },
      null,
    );
    const sampler = await signInApi(t.app, 'sampler@crowntip.test');
    const p = await planting(true);
    expect((await post(sampler, '/api/walks', body(p.plantingId, { planSeed: 'abc', planStops: 10 }))).body.plan.edgeMarginM).toBe(15);
  });
});

describe('the walk page draws the planned stops again', () => {
  const rows = (html: string) =>
    [...html.matchAll(/<tr data-planned-row="(\d+)"(?: data-lat="([^"]+)" data-lon="([^"]+)")?>/g)].map((m) => ({
      stop: Number(m[1]),
      lat: m[2] === undefined ? null : Number(m[2]),
      lon: m[3] === undefined ? null : Number(m[3]),
    }));

  it('shows exactly the stops of the walk plan for the stored seed, boundary, margin and count, on the sketch and in the table', async () => {
    const sampler = await signInApi(t.app, 'sampler@crowntip.test');
    const p = await planting(true);
    const walk = await post(sampler, '/api/walks', body(p.plantingId, { planSeed: 'k3v9q0z1m2x8', planStops: 12 }));
    const office = await signInPages(t.app, 'clerk@crowntip.test');
    const page = await office.get(`/walks/${walk.body.id}`);
    expect(page.status).toBe(200);
    const expected = walkPlan(p.boundary!, { seed: 'k3v9q0z1m2x8', stops: 12, edgeMarginM: 10, areaHa: p.areaHa });
    expect(rows(page.text)).toEqual(expected.stops.map((s) => ({ stop: s.index, lat: s.lat, lon: s.lng })));
    const squares = [...page.text.matchAll(/data-planned-stop="(\d+)" data-lat="([^"]+)" data-lon="([^"]+)"/g)].map((m) => [Number(m[1]), Number(m[2]), Number(m[3])]);
    expect(squares).toEqual(expected.stops.map((s) => [s.index, s.lat, s.lng]));
    expect(page.text).toContain(`data-plan-pattern="${expected.pattern}"`);
    expect(page.text).toContain('planned stop');
    expect(page.text).toContain('plant dug (GPS)');
    // Another seed gives other stops on the same page.
    const other = walkPlan(p.boundary!, { seed: 'other', stops: 12, edgeMarginM: 10 });
    expect(at(rows(page.text), 0).lat).not.toBe(at(other.stops, 0).lat);
  });

  it('says so for a walk without a seed, and plans from the area for a field without a boundary', async () => {
    const sampler = await signInApi(t.app, 'sampler@crowntip.test');
    const office = await signInPages(t.app, 'clerk@crowntip.test');
    const withBoundary = await planting(true);
    const none = await post(sampler, '/api/walks', body(withBoundary.plantingId));
    const page = await office.get(`/walks/${none.body.id}`);
    expect(page.text).toContain('data-plan-none');
    expect(rows(page.text)).toEqual([]);

    const bare = await planting(false);
    const walk = await post(sampler, '/api/walks', body(bare.plantingId, { planSeed: 'abc', planStops: 10 }));
    const areaPage = await office.get(`/walks/${walk.body.id}`);
    const expected = walkPlan(null, { seed: 'abc', stops: 10, edgeMarginM: 10, areaHa: bare.areaHa });
    expect(rows(areaPage.text)).toEqual(expected.stops.map((s) => ({ stop: s.index, lat: null, lon: null })));
    expect(areaPage.text).toContain('data-plan-pattern="square"');
    expect(areaPage.text).toContain('No boundary on file');
  });
});
