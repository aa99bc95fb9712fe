import { randomUUID } from 'node:crypto';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import request from 'supertest';
import { createTestApp, signInApi, type TestApp } from '../../helpers/app';
import { seasonOfDate, todayIso } from '../../../shared/registry/season';
import { todayResponseSchema, type TodayItem } from '../../../shared/schemas/walks';
import { DEMO_ORGANISATIONS, DEMO_USERS } from '../../../seeds/demo-people';
import { at } from '../../helpers/lists';

// GET /api/today: the signed-in user's plantings due for a walk (README, Field walks API).

const ORG1 = DEMO_ORGANISATIONS[0].id;
const userId = (email: string) => DEMO_USERS.find((u) => u.email === email)!.id;
const addDays = (iso: string, days: number) => new Date(Date.parse(`${iso}T00:00:00Z`) + days * 86_400_000).toISOString().slice(0, 10);

let t: TestApp;
beforeEach(async () => {
  t = await createTestApp();
});
afterEach(async () => {
  await t.close();
});

type Client = Awaited<ReturnType<typeof signInApi>>;
const as = (email: string) => signInApi(t.app, email);
async function today(c: Client, q = ''): Promise<TodayItem[]> {
  const res = await c.agent.get(`/api/today${q}`);
  expect(res.status, JSON.stringify(res.body)).toBe(200);
  const body = todayResponseSchema.parse(res.body);
  expect(body.total).toBe(body.items.length);
  return body.items;
}
const byRanchAndField = (a: TodayItem, b: TodayItem) => (a.ranchName === b.ranchName ? (a.fieldName < b.fieldName ? -1 : 1) : a.ranchName < b.ranchName ? -1 : 1);

/** This season's plantings of organisation 1 still in the ground today, straight from the tables. */
async function duePlantingIds(): Promise<string[]> {
  const rows = await t.db('plantings')
    .where({ organisation_id: ORG1, season: seasonOfDate(todayIso()) })
    .where((w) => w.whereNull('terminated_on').orWhere('terminated_on', '>=', todayIso()))
    .select('id');
  return rows.map((r: { id: string }) => r.id).sort();
}

describe('GET /api/today', () => {
  it('lists the plantings assigned to the sampler first, then the rest, each by ranch and field', async () => {
    const items = await today(await as('sampler@crowntip.test'));
    const assigned = items.filter((i) => i.assigned);
    expect(assigned).toHaveLength(6); // the demo assigns six cereal plantings to this sampler
    expect(items.slice(0, 6)).toEqual(assigned);
    expect(assigned.every((i) => ['cereal_rye', 'triticale', 'barley', 'oats', 'wheat'].includes(i.crop))).toBe(true);
    expect([...assigned].sort(byRanchAndField)).toEqual(assigned);
    const rest = items.slice(6);
    expect([...rest].sort(byRanchAndField)).toEqual(rest);
    expect(items.map((i) => i.plantingId).sort()).toEqual(await duePlantingIds());
  });

  it('lists every due planting of the organisation, none assigned, for a user without assignments', async () => {
    const items = await today(await as('clerk@crowntip.test'));
    expect(items.every((i) => !i.assigned)).toBe(true);
    expect([...items].sort(byRanchAndField)).toEqual(items);
    expect(items.map((i) => i.plantingId).sort()).toEqual(await duePlantingIds());
    const other = await today(await as('sampler@quillwater.test'));
    expect(other.length).toBeGreaterThan(0);
    expect(other.every((i) => !i.assigned)).toBe(true);
    expect(other.some((i) => items.some((j) => j.plantingId === i.plantingId))).toBe(false);
  });

  it('leaves out plantings terminated before today, keeps one terminated today, and other seasons', async () => {
    const clerk = await as('clerk@crowntip.test');
    const before = await today(clerk);
    const [a, b] = [at(before, 0), at(before, 1)];
    await t.db('plantings').where('id', a.plantingId).update({ terminated_on: addDays(todayIso(), -1) });
    await t.db('plantings').where('id', b.plantingId).update({ terminated_on: todayIso() });
    const after = (await today(clerk)).map((i) => i.plantingId);
    expect(after).not.toContain(a.plantingId);
    expect(after).toContain(b.plantingId);
    expect(after).toHaveLength(before.length - 1);
    const season = seasonOfDate(todayIso());
    expect((await today(clerk)).every((i) => i.season === season)).toBe(true);
  });

  it('carries the field, days since seeding, calibration and the latest walk of each planting', async () => {
    const sampler = await as('sampler@crowntip.test');
    const first = at(await today(sampler), 0, 'planting due today');
    const planting = await t.db('plantings').where('id', first.plantingId).first();
    const field = await t.db('fields').where('id', planting.field_id).first();
    expect(first).toMatchObject({
      fieldId: field.id,
      fieldName: field.name,
      areaHa: field.area_ha,
      boundary: field.boundary ? JSON.parse(field.boundary) : null,
      crop: planting.crop,
      seededOn: planting.seeded_on,
      latestWalk: null,
    });
    expect(first.daysSinceSeeding).toBe(Math.round((Date.parse(todayIso()) - Date.parse(planting.seeded_on)) / 86_400_000));
    const assignment = await t.db('calibration_assignments').where({ organisation_id: ORG1, crop: planting.crop, variety: '' }).first();
    if (!planting.variety) expect(first.calibrationId).toBe(assignment?.calibration_id ?? null);

    const id = randomUUID();
    const res = await sampler.agent
      .post('/api/walks')
      .set('X-CSRF-Token', sampler.csrf)
      .send({ id, plantingId: first.plantingId, walkedOn: todayIso(), plants: [{ stop: 1, lengthCm: 70 }] });
    expect(res.status).toBe(201);
    const again = (await today(sampler)).find((i) => i.plantingId === first.plantingId)!;
    expect(again.latestWalk).toEqual({ id, status: 'draft', walkedOn: todayIso(), rejectReason: null });
    // The demo's walks by another sampler show as the latest walk of their plantings.
    const walked = (await today(sampler)).filter((i) => i.latestWalk && i.latestWalk.id !== id);
    expect(walked.map((i) => i.latestWalk!.status).sort()).toEqual(['approved', 'submitted']);
  });

  it('filters on the field name with ?q=', async () => {
    const clerk = await as('clerk@crowntip.test');
    const items = await today(clerk, '?q=flats');
    expect(items.length).toBeGreaterThan(0);
    expect(items.every((i) => i.fieldName.toLowerCase().includes('flats'))).toBe(true);
    expect(await today(clerk, '?q=zzzz-no-such-field')).toEqual([]);
    expect(await today(clerk, '?q=')).toHaveLength((await today(clerk)).length);
    const tooLong = await clerk.agent.get(`/api/today?q=${'x'.repeat(201)}`);
    expect(tooLong.status).toBe(400);
    expect(Object.keys(tooLong.body.error.fields)).toContain('q');
  });

  it('is for samplers, clerks and admins: auditors 403, signed out 401', async () => {
    expect((await (await as('admin@crowntip.test')).agent.get('/api/today')).status).toBe(200);
    const auditor = await (await as('auditor@crowntip.test')).agent.get('/api/today');
    expect(auditor.status).toBe(403);
    expect(auditor.body.error.code).toBe('forbidden');
    const out = await request(t.app).get('/api/today');
    expect(out.status).toBe(401);
  });

  it('follows assignments made and taken back by a clerk', async () => {
    const clerk = await as('clerk@crowntip.test');
    const sampler2 = await as('sampler2@crowntip.test');
    const before = await today(sampler2);
    const assignedBefore = before.filter((i) => i.assigned).map((i) => i.plantingId);
    const target = before.find((i) => !i.assigned)!;
    const url = `/api/plantings/${target.plantingId}/assignment`;
    expect((await clerk.agent.put(url).set('X-CSRF-Token', clerk.csrf).send({ samplerId: userId('sampler2@crowntip.test') })).status).toBe(200);
    const after = await today(sampler2);
    expect(after.filter((i) => i.assigned).map((i) => i.plantingId).sort()).toEqual([...assignedBefore, target.plantingId].sort());
    expect((await clerk.agent.delete(`${url}/${userId('sampler2@crowntip.test')}`).set('X-CSRF-Token', clerk.csrf)).status).toBe(204);
    expect((await today(sampler2)).filter((i) => i.assigned).map((i) => i.plantingId)).toEqual(assignedBefore);
  });
});
