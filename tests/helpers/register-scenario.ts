import { afterEach, beforeEach } from 'vitest';
import { createTestApp, type TestApp } from './app';
import { randomUUID } from 'node:crypto';
import type { Knex } from 'knex';
import { CEREAL_CROPS } from '../../shared/calc/rules';
import { acToHa, lbPerAcToKgPerHa } from '../../shared/calc/units';
import { insertRuleVersion } from '../../server/rules/db';
import { DEMO_ORGANISATIONS, DEMO_USERS } from '../../seeds/demo-people';

/*
 * A register scenario whose credits are worked out by hand in tests/server/registers.test.ts:
 * its own ranch in the first demo organisation, its own credit rule versions, fields, plantings and
 * field walks written straight into the database with known estimate snapshots.
 */

export const ORG = DEMO_ORGANISATIONS[0].id;
export const OTHER_ORG = DEMO_ORGANISATIONS[1].id;
export const userId = (email: string) => DEMO_USERS.find((u) => u.email === email)!.id;

export const YEAR = 2025; // season 2024-25
export const SEASON = '2024-25';

export function estimateSnapshot(biomassKgHa: number, meanLengthCm = 80) {
  return {
    calibrationId: 'cal-rye-test',
    calibrationVersion: 3,
    n: 10,
    meanLengthCm,
    biomassKgHa,
    interval: [biomassKgHa * 0.8, biomassKgHa * 1.2] as [number, number],
    samplingRange: [biomassKgHa * 0.9, biomassKgHa * 1.1] as [number, number],
    level: 0.9,
    thresholdKgHa: lbPerAcToKgPerHa(4500),
    meetsThreshold: biomassKgHa >= lbPerAcToKgPerHa(4500),
    extrapolated: false,
    morePlantsSuggested: null,
    note: 'test estimate',
  };
}

export async function insertRanch(db: Knex, name: string, contactEmails: string[] = [], org = ORG): Promise<string> {
  const id = randomUUID();
  const now = new Date().toISOString();
  await db('ranches').insert({ id, organisation_id: org, name, contact_emails: contactEmails.join(',') || null, created_at: now, updated_at: now });
  return id;
}

export async function insertField(db: Knex, ranchId: string, name: string, areaAc: number, org = ORG): Promise<string> {
  const id = randomUUID();
  const now = new Date().toISOString();
  await db('fields').insert({ id, organisation_id: org, ranch_id: ranchId, name, area_ha: acToHa(areaAc), created_at: now, updated_at: now });
  return id;
}

export async function insertPlanting(
  db: Knex,
  fieldId: string,
  p: { crop: string; variety?: string | null; seededOn: string; terminatedOn?: string | null; season?: string },
  org = ORG,
): Promise<string> {
  const id = randomUUID();
  const now = new Date().toISOString();
  await db('plantings').insert({
    id,
    organisation_id: org,
    field_id: fieldId,
    season: p.season ?? SEASON,
    crop: p.crop,
    variety: p.variety ?? null,
    seeded_on: p.seededOn,
    terminated_on: p.terminatedOn ?? null,
    created_at: now,
    updated_at: now,
  });
  return id;
}

export async function insertWalk(
  db: Knex,
  plantingId: string,
  walkedOn: string,
  biomassKgHa: number,
  status: 'approved' | 'submitted' | 'rejected' | 'draft' = 'approved',
  org = ORG,
): Promise<string> {
  const id = randomUUID();
  const now = new Date().toISOString();
  await db('field_walks').insert({
    id,
    organisation_id: org,
    planting_id: plantingId,
    sampler_id: org === ORG ? userId('sampler2@crowntip.test') : userId('sampler@quillwater.test'),
    walked_on: walkedOn,
    status,
    content_hash: 'test',
    estimate: JSON.stringify(estimateSnapshot(biomassKgHa)),
    created_at: now,
    submitted_at: now,
    reviewed_by: status === 'approved' ? userId('clerk@crowntip.test') : null,
    reviewed_at: status === 'approved' ? now : null,
  });
  return id;
}

/**
 * The hand-worked scenario (see the arithmetic in tests/server/registers.test.ts). Rule version 2
 * (in effect from 2024-07-01) is the one in effect on 1 January 2025; version 3, effective
 * 2025-06-01 with a different credit, must not be used for 2025.
 */
export async function buildHandWorkedScenario(db: Knex) {
  const rule = {
    thresholdKgHa: lbPerAcToKgPerHa(4500),
    minDaysInWindow: 90,
    window: { start: '10-01', end: '03-31' },
    eligibleCrops: [...CEREAL_CROPS],
    creditKgNPerHa: lbPerAcToKgPerHa(50),
    maxDaysSampleBeforeTermination: 30,
  };
  const author = { id: userId('admin@crowntip.test'), name: 'Noor Halvane' };
  const v2 = await insertRuleVersion(db, ORG, { ...rule, effectiveFrom: '2024-07-01' }, author);
  await insertRuleVersion(db, ORG, { ...rule, creditKgNPerHa: lbPerAcToKgPerHa(80), effectiveFrom: '2025-06-01' }, author);

  const ranchId = await insertRanch(db, 'Hand-Worked Ranch', ['grower@handworked.test', 'office@handworked.test']);
  const f = {
    a: await insertField(db, ranchId, 'A North', 10),
    b: await insertField(db, ranchId, 'B Legume', 20),
    c: await insertField(db, ranchId, 'C Early Walk', 5),
    d: await insertField(db, ranchId, 'D Boundary', 12.5),
    e: await insertField(db, ranchId, 'E Late Seeding', 8),
    f: await insertField(db, ranchId, '=cmd()', 4),
    g: await insertField(db, ranchId, 'G Fallow', 3),
    h: await insertField(db, ranchId, 'H Projected', 6),
    i: await insertField(db, ranchId, 'I Walk After', 2),
  };
  const p = {
    a: await insertPlanting(db, f.a, { crop: 'cereal_rye', variety: 'Ridgeline', seededOn: '2024-10-15', terminatedOn: '2025-03-20' }),
    b: await insertPlanting(db, f.b, { crop: 'legume', variety: 'Purple vetch', seededOn: '2024-10-01', terminatedOn: '2025-03-31' }),
    c: await insertPlanting(db, f.c, { crop: 'triticale', seededOn: '2024-10-10', terminatedOn: '2025-04-15' }),
    d: await insertPlanting(db, f.d, { crop: 'barley', seededOn: '2024-09-01', terminatedOn: '2025-01-05' }),
    e: await insertPlanting(db, f.e, { crop: 'oats', seededOn: '2025-01-15', terminatedOn: '2025-05-01' }),
    f: await insertPlanting(db, f.f, { crop: 'wheat', variety: '-2+3', seededOn: '2024-11-01', terminatedOn: '2025-03-01' }),
    h: await insertPlanting(db, f.h, { crop: 'cereal_rye', seededOn: '2024-11-01', terminatedOn: null }),
    i: await insertPlanting(db, f.i, { crop: 'cereal_rye', seededOn: '2024-10-01', terminatedOn: '2025-03-01' }),
  };
  // The previous season's planting on A must not appear in the 2025 register.
  await insertPlanting(db, f.a, { crop: 'cereal_rye', seededOn: '2023-10-15', terminatedOn: '2024-03-20', season: '2023-24' });
  const w = {
    aEarly: await insertWalk(db, p.a, '2025-02-01', 4000),
    aUsed: await insertWalk(db, p.a, '2025-03-05', 6000),
    aSubmitted: await insertWalk(db, p.a, '2025-03-15', 3000, 'submitted'),
    aRejected: await insertWalk(db, p.a, '2025-03-16', 3000, 'rejected'),
    b: await insertWalk(db, p.b, '2025-03-15', 7000),
    c: await insertWalk(db, p.c, '2025-03-01', 6000),
    d: await insertWalk(db, p.d, '2024-12-20', 5100),
    e: await insertWalk(db, p.e, '2025-04-20', 8000),
    h: await insertWalk(db, p.h, '2025-12-20', 6000),
    i: await insertWalk(db, p.i, '2025-03-05', 6000),
  };
  return { ranchId, fields: f, plantings: p, walks: w, ruleV2: v2 };
}

export type HandWorkedScenario = Awaited<ReturnType<typeof buildHandWorkedScenario>>;

/**
 * Gives each test of the file a fresh app holding the hand-worked scenario: `use` receives both
 * before every test, and the app is closed after it.
 */
export function freshScenarioForEachTest(use: (t: TestApp, s: HandWorkedScenario) => void): void {
  let app: TestApp | undefined;
  beforeEach(async () => {
    app = await createTestApp();
    use(app, await buildHandWorkedScenario(app.db));
  });
  afterEach(async () => {
    await app?.close();
  });
}
