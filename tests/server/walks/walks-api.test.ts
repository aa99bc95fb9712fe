import { randomUUID } from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import request from 'supertest';
import { createTestApp, signInApi, signInPages, type TestApp } from '../../helpers/app';
import { estimateBiomass, fitCalibration, type Fit } from '../../../shared/calc';
import { addDaysIso, seasonOfDate, todayIso } from '../../../shared/registry/season';
import { walkEstimateSchema, walkPhotoSchema, walkSchema, type Walk } from '../../../shared/schemas/walks';
import { insertCalibration, insertDataset, markPublished, setAssignment } from '../../../server/calibrations/db';
import { duePlantings } from '../../../server/walks/db';
import { createWalk as createWalkInService } from '../../../server/walks/service';
import { contextFor } from '../../../server/platform/context';
import { seasonRows } from '../../../server/registry/season-view';
import { DEMO_WALK_IDS } from '../../../seeds/04_demo_walks';
import { DEMO_ORGANISATIONS, DEMO_USERS } from '../../../seeds/demo-people';
import { at } from '../../helpers/lists';

// Field walks (README, "Field walks API"). Every test runs on a fresh in-memory database with
// the demo scenario and its own uploads folder; the walks it posts are invented.

const ORG1 = DEMO_ORGANISATIONS[0].id;
const ORG2 = DEMO_ORGANISATIONS[1].id;
const userId = (email: string) => DEMO_USERS.find((u) => u.email === email)!.id;

/** A real 8 × 8 grey baseline JPEG (hand-built; it decodes in Chromium) and a real 1 × 1 PNG. */
const TINY_JPEG = Buffer.from(
  '/9j/4AAQSkZJRgABAQAAAQABAAD/2wBDAAEBAQEBAQEBAQEBAQEBAQEBAQEBAQEBAQEBAQEBAQEBAQEBAQEBAQEBAQEBAQEBAQEBAQEBAQEBAQEBAQEBAQH/wAALCAAIAAgBAREA/8QAFAABAAAAAAAAAAAAAAAAAAAAAP/EABQQAQAAAAAAAAAAAAAAAAAAAAD/2gAIAQEAAD8AP//Z',
  'base64',
);
const TINY_PNG = Buffer.from('iVBORw0KGgoAAAANSUhEUgAAAAEAAAABCAIAAACQd1PeAAAADElEQVR4nGPwqtEDAAIIAPXOsRDEAAAAAElFTkSuQmCC', 'base64');

let t: TestApp;
let uploads: string;
beforeEach(async () => {
  uploads = fs.mkdtempSync(path.join(os.tmpdir(), 'crowntip-walks-'));
  t = await createTestApp({ UPLOADS_DIR: uploads });
});
afterEach(async () => {
  await t.close();
  fs.rmSync(uploads, { recursive: true, force: true });
});

type Client = Awaited<ReturnType<typeof signInApi>>;
const as = (email: string) => signInApi(t.app, email);
const post = (c: Client, p: string, body: unknown = {}) => c.agent.post(p).set('X-CSRF-Token', c.csrf).send(body as object);
const put = (c: Client, p: string, body: unknown) => c.agent.put(p).set('X-CSRF-Token', c.csrf).send(body as object);
const del = (c: Client, p: string) => c.agent.delete(p).set('X-CSRF-Token', c.csrf);
const upload = (c: Client, walkId: string, stop: number | string, data: Buffer, filename = 'stop.jpg') =>
  c.agent.post(`/api/walks/${walkId}/photos`).set('X-CSRF-Token', c.csrf).field('stop', String(stop)).attach('photo', data, filename);

function expectError(res: request.Response, status: number, code: string) {
  expect(res.status, JSON.stringify(res.body)).toBe(status);
  expect(res.body.error.code).toBe(code);
}
function expectInvalid(res: request.Response, field: string) {
  expectError(res, 400, 'invalid');
  expect(Object.keys(res.body.error.fields ?? {})).toContain(field);
}

/** This season's plantings of an organisation still in the ground, by crop. */
async function duePlanting(orgId: string, crop: string, index = 0) {
  const due = (await duePlantings(t.db, orgId, { season: seasonOfDate(todayIso()), today: todayIso() })).filter(
    (p) => p.crop === crop,
  );
  if (!due[index]) throw new Error(`no ${crop} planting #${index} in the demo registry`);
  return due[index];
}

const LENGTHS = [81.5, 77.0, 88.5, 72.0, 84.0, 79.5, 90.0, 75.5, 83.0, 78.0];
function walkBody(plantingId: string, extra: Record<string, unknown> = {}) {
  return {
    id: randomUUID(),
    plantingId,
    walkedOn: todayIso(),
    stage: 'Z31',
    notes: 'Soft ground by the pump.',
    plants: LENGTHS.map((lengthCm, i) => ({ stop: i + 1, lengthCm, lat: 36.2 + i * 0.0001, lon: -134.9 })),
    ...extra,
  };
}

async function createWalk(c: Client, plantingId: string, extra: Record<string, unknown> = {}): Promise<Walk> {
  const res = await post(c, '/api/walks', walkBody(plantingId, extra));
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return walkSchema.parse(res.body);
}

/** A published calibration of invented points, assigned to a crop for organisation 1. */
async function publishCalibration(crop: string, slope: number, version: number): Promise<{ id: string; fit: Fit }> {
  const points = [30, 40, 50, 60, 70, 80, 90, 100, 110].map((x, i) => ({ x, y: slope * x - 1500 + ((i * 37) % 11) * 40 }));
  const fit = fitCalibration(points, 'linear');
  const admin = userId('admin@crowntip.test');
  const datasetId = await insertDataset(t.db, ORG1, { name: `Invented ${crop} pairs v${version}`, lengthUnit: 'cm', biomassUnit: 'kg_ha', points, uploadedBy: admin });
  const id = await insertCalibration(t.db, ORG1, { datasetId, crop, model: 'linear', fit, n: points.length, xRange: fit.xRange, createdBy: admin });
  // Demo calibrations may already hold low version numbers: take one far above them.
  expect(await markPublished(t.db, ORG1, id, { model: 'linear', fit, version: 900 + version, label: `test v${version}`, publishedBy: admin })).toBe(true);
  await setAssignment(t.db, ORG1, { crop, variety: null, calibrationId: id, assignedBy: admin });
  return { id, fit };
}

describe('signed out', () => {
  it('answers every walk route with 401', async () => {
    const agent = request.agent(t.app);
    const csrf = (await agent.get('/api/session')).body.csrfToken as string;
    const id = DEMO_WALK_IDS.submitted;
    const routes: ['get' | 'post' | 'put' | 'delete', string][] = [
      ['get', '/api/walks'],
      ['post', '/api/walks'],
      ['get', `/api/walks/${id}`],
      ['get', `/api/walks/${id}/estimate`],
      ['post', `/api/walks/${id}/photos`],
      ['get', `/api/walks/${id}/photos/any`],
      ['post', `/api/walks/${id}/submit`],
      ['post', `/api/walks/${id}/approve`],
      ['post', `/api/walks/${id}/reject`],
      ['get', '/api/today'],
      ['put', '/api/plantings/any/assignment'],
      ['delete', `/api/plantings/any/assignment/${userId('sampler@crowntip.test')}`],
      ['get', '/api/rules/current'],
    ];
    for (const [method, p] of routes) {
      const req = agent[method](p);
      const res = method === 'get' ? await req : await req.set('X-CSRF-Token', csrf).send({});
      expect(res.status, `${method} ${p}`).toBe(401);
      expect(res.body.error.code).toBe('unauthenticated');
    }
  });
});

describe('POST /api/walks', () => {
  it('stores a draft walk with its plants and answers it in the shared shape', async () => {
    const sampler = await as('sampler@crowntip.test');
    const planting = await duePlanting(ORG1, 'cereal_rye');
    const body = walkBody(planting.plantingId);
    const res = await post(sampler, '/api/walks', body);
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    const walk = walkSchema.parse(res.body);
    expect(walk).toMatchObject({
      id: body.id,
      plantingId: planting.plantingId,
      fieldId: planting.fieldId,
      fieldName: planting.fieldName,
      ranchName: planting.ranchName,
      crop: 'cereal_rye',
      walkedOn: body.walkedOn,
      stage: 'Z31',
      status: 'draft',
      sampler: { id: userId('sampler@crowntip.test') },
      photos: [],
      submittedAt: null,
      reviewedBy: null,
    });
    expect(walk.plants).toEqual(body.plants);
    const again = await sampler.agent.get(`/api/walks/${body.id}`);
    expect(again.status).toBe(200);
    expect(again.body).toEqual(res.body);
  });

  it('refuses bad bodies with 400 naming the field', async () => {
    const sampler = await as('sampler@crowntip.test');
    const planting = await duePlanting(ORG1, 'cereal_rye');
    expectInvalid(await post(sampler, '/api/walks', walkBody(planting.plantingId, { id: 'walk-1' })), 'id');
    expectInvalid(await post(sampler, '/api/walks', walkBody(planting.plantingId, { plants: [] })), 'plants');
    expectInvalid(await post(sampler, '/api/walks', walkBody(planting.plantingId, { plants: [{ stop: 1, lengthCm: 400 }] })), 'plants.0.lengthCm');
    expectInvalid(await post(sampler, '/api/walks', walkBody(planting.plantingId, { walkedOn: '2026-02-30' })), 'walkedOn');
    // A phone may be a day ahead of the server's UTC date; two days ahead is refused.
    expectInvalid(await post(sampler, '/api/walks', walkBody(planting.plantingId, { walkedOn: addDaysIso(todayIso(), 2) })), 'walkedOn');
    expectInvalid(
      await post(sampler, '/api/walks', walkBody(planting.plantingId, { plants: [{ stop: 1, lengthCm: 50 }, { stop: 1, lengthCm: 60 }] })),
      'plants',
    );
    // A planting of another organisation is as unknown as a made-up one.
    const foreign = await duePlanting(ORG2, 'cereal_rye');
    expectInvalid(await post(sampler, '/api/walks', walkBody(foreign.plantingId)), 'plantingId');
    expectInvalid(await post(sampler, '/api/walks', walkBody('no-such-planting')), 'plantingId');
    expect(await t.db('field_walks').whereNotIn('id', Object.values(DEMO_WALK_IDS)).count({ n: '*' }).first()).toEqual({ n: 0 });
  });

  it('lets samplers, clerks and admins create walks, not auditors', async () => {
    const planting = await duePlanting(ORG1, 'triticale');
    for (const email of ['sampler@crowntip.test', 'clerk@crowntip.test', 'admin@crowntip.test']) {
      await createWalk(await as(email), planting.plantingId);
    }
    const auditor = await as('auditor@crowntip.test');
    expectError(await post(auditor, '/api/walks', walkBody(planting.plantingId)), 403, 'forbidden');
  });

  it('gives one record when the same walk is posted 20 times at once', async () => {
    const sampler = await as('sampler@crowntip.test');
    const planting = await duePlanting(ORG1, 'cereal_rye');
    const body = walkBody(planting.plantingId);
    const answers = await Promise.all(Array.from({ length: 20 }, () => post(sampler, '/api/walks', body)));
    const statuses = answers.map((r) => r.status);
    expect(statuses.every((s) => s === 200 || s === 201), statuses.join(',')).toBe(true);
    expect(statuses.filter((s) => s === 201)).toHaveLength(1);
    for (const r of answers) expect(r.body).toEqual(at(answers, 0).body);
    expect(await t.db('field_walks').where('id', body.id).count({ n: '*' }).first()).toEqual({ n: 1 });
    expect(await t.db('walk_plants').where('walk_id', body.id).count({ n: '*' }).first()).toEqual({ n: 10 });
  });

  it('falls back to read-and-compare when concurrent inserts race on the primary key', async () => {
    // Called on the service directly, all 20 pass the "already stored?" read before any inserts,
    // so 19 of them hit the primary key and must find the stored walk (or a conflict) instead.
    const planting = await duePlanting(ORG1, 'cereal_rye');
    const actor = contextFor({ id: userId('sampler@crowntip.test'), name: 'Sampler', organisationId: ORG1, role: 'sampler', units: 'metric' });
    const body = walkBody(planting.plantingId);
    const same = await Promise.all(Array.from({ length: 20 }, () => createWalkInService(t.db, actor, body)));
    expect(same.filter((r) => r.created)).toHaveLength(1);
    for (const r of same) expect(r.walk).toEqual(at(same, 0).walk);

    const other = walkBody(planting.plantingId);
    const mixed = await Promise.allSettled(
      Array.from({ length: 10 }, (_, i) => createWalkInService(t.db, actor, i % 2 ? { ...other, notes: `Variant ${i}` } : other)),
    );
    const stored = mixed.flatMap((r) => (r.status === 'fulfilled' ? [r.value] : []));
    expect(stored.filter((r) => r.created)).toHaveLength(1);
    for (const r of stored) expect(r.walk).toEqual(at(stored, 0).walk);
    for (const r of mixed) if (r.status === 'rejected') expect(r.reason).toMatchObject({ code: 'conflict', status: 409 });
    expect(await t.db('field_walks').whereIn('id', [body.id, other.id]).count({ n: '*' }).first()).toEqual({ n: 2 });
    expect(await t.db('walk_plants').whereIn('walk_id', [body.id, other.id]).count({ n: '*' }).first()).toEqual({ n: 20 });
  });

  it('answers a re-post of the same content with the stored walk, whatever the order of the plants', async () => {
    const sampler = await as('sampler@crowntip.test');
    const planting = await duePlanting(ORG1, 'cereal_rye');
    const body = walkBody(planting.plantingId);
    const first = await post(sampler, '/api/walks', body);
    expect(first.status).toBe(201);
    const again = await post(sampler, '/api/walks', { ...body, plants: [...body.plants].reverse() });
    expect(again.status).toBe(200);
    expect(again.body).toEqual(first.body);
  });

  it('answers the same id with other content with 409 and keeps the stored walk', async () => {
    const sampler = await as('sampler@crowntip.test');
    const planting = await duePlanting(ORG1, 'cereal_rye');
    const body = walkBody(planting.plantingId);
    const first = await post(sampler, '/api/walks', body);
    expect(first.status).toBe(201);
    const changed = { ...body, plants: body.plants.map((p, i) => (i === 0 ? { ...p, lengthCm: p.lengthCm + 1 } : p)) };
    expectError(await post(sampler, '/api/walks', changed), 409, 'conflict');
    expectError(await post(sampler, '/api/walks', { ...body, notes: 'Other words.' }), 409, 'conflict');
    expect((await sampler.agent.get(`/api/walks/${body.id}`)).body).toEqual(first.body);
  });

  it('answers an id taken in another organisation with 409, telling nothing about it', async () => {
    const sampler = await as('sampler@crowntip.test');
    const body = walkBody((await duePlanting(ORG1, 'cereal_rye')).plantingId);
    expect((await post(sampler, '/api/walks', body)).status).toBe(201);
    const other = await as('sampler@quillwater.test');
    const res = await post(other, '/api/walks', { ...body, plantingId: (await duePlanting(ORG2, 'cereal_rye')).plantingId });
    expectError(res, 409, 'conflict');
    expect(JSON.stringify(res.body)).not.toContain(body.plantingId);
  });
});

describe('estimate snapshot', () => {
  it('stores the estimate of the assigned calibration, which never changes afterwards', async () => {
    const calibration = await publishCalibration('cereal_rye', 80, 1);
    const sampler = await as('sampler@crowntip.test');
    const planting = await duePlanting(ORG1, 'cereal_rye');
    const body = walkBody(planting.plantingId);
    const walk = walkSchema.parse((await post(sampler, '/api/walks', body)).body);

    const rule = (await sampler.agent.get('/api/rules/current')).body;
    const e = estimateBiomass(calibration.fit, LENGTHS, { thresholdKgHa: rule.thresholdKgHa, level: 0.9 });
    expect(walk.estimate).toMatchObject({
      calibrationId: calibration.id,
      calibrationVersion: 901,
      n: 10,
      meanLengthCm: e.meanLengthCm,
      biomassKgHa: e.biomassKgHa,
      interval: e.interval,
      samplingRange: e.samplingRange,
      level: 0.9,
      thresholdKgHa: rule.thresholdKgHa,
      meetsThreshold: e.meetsThreshold,
      extrapolated: e.extrapolated,
      verdict: expect.any(String),
      ruleVersion: rule.version,
    });
    // Numbers, not words: new snapshots store no note.
    expect(walk.estimate).not.toHaveProperty('note');
    const estimate = await sampler.agent.get(`/api/walks/${walk.id}/estimate`);
    expect(estimate.status).toBe(200);
    expect(walkEstimateSchema.parse(estimate.body)).toEqual(walk.estimate);

    // A new calibration version assigned to the crop: the stored walk keeps its snapshot, even when
    // posted again; a new walk uses the new version.
    const next = await publishCalibration('cereal_rye', 95, 2);
    const repost = await post(sampler, '/api/walks', body);
    expect(repost.status).toBe(200);
    expect(repost.body.estimate).toEqual(walk.estimate);
    expect((await sampler.agent.get(`/api/walks/${walk.id}`)).body.estimate).toEqual(walk.estimate);
    const newer = await createWalk(sampler, planting.plantingId);
    expect(newer.estimate?.calibrationId).toBe(next.id);
    expect(newer.estimate?.biomassKgHa).not.toBe(walk.estimate?.biomassKgHa);
  });

  it('stores no estimate for a crop without a calibration, and /estimate answers 404', async () => {
    await t.db('calibration_assignments').where({ organisation_id: ORG1, crop: 'oats' }).delete();
    const sampler = await as('sampler@crowntip.test');
    const walk = await createWalk(sampler, (await duePlanting(ORG1, 'oats')).plantingId);
    expect(walk.estimate).toBeNull();
    expectError(await sampler.agent.get(`/api/walks/${walk.id}/estimate`), 404, 'not_found');
  });
});

describe('reading walks', () => {
  it('shows a sampler their own walks and those of plantings assigned to them; the office sees all', async () => {
    const sampler = await as('sampler@crowntip.test');
    const sampler2 = await as('sampler2@crowntip.test');
    const planting = await duePlanting(ORG1, 'barley');
    const walk = await createWalk(sampler, planting.plantingId);

    const ids = async (c: Client, q = '') => ((await c.agent.get(`/api/walks${q}`)).body.items as Walk[]).map((w) => w.id);
    expect(await ids(sampler)).toContain(walk.id);
    expect(await ids(sampler2)).not.toContain(walk.id);
    expectError(await sampler2.agent.get(`/api/walks/${walk.id}`), 404, 'not_found');

    const clerk = await as('clerk@crowntip.test');
    expect((await put(clerk, `/api/plantings/${planting.plantingId}/assignment`, { samplerId: userId('sampler2@crowntip.test') })).status).toBe(200);
    expect(await ids(sampler2)).toContain(walk.id);
    expect((await sampler2.agent.get(`/api/walks/${walk.id}`)).status).toBe(200);

    for (const email of ['clerk@crowntip.test', 'admin@crowntip.test', 'auditor@crowntip.test']) {
      const c = await as(email);
      const list = await c.agent.get('/api/walks');
      expect(list.body.total).toBe(3); // the two demo walks and this one
      expect(await ids(c)).toContain(walk.id);
    }
  });

  it('filters by status and planting, pages, and refuses unknown filters', async () => {
    const clerk = await as('clerk@crowntip.test');
    const submitted = await clerk.agent.get('/api/walks?status=submitted');
    expect(submitted.body).toMatchObject({ total: 1, items: [{ id: DEMO_WALK_IDS.submitted, status: 'submitted' }] });
    const approved = (await clerk.agent.get('/api/walks?status=approved')).body.items[0] as Walk;
    const byPlanting = await clerk.agent.get(`/api/walks?plantingId=${approved.plantingId}`);
    expect(byPlanting.body.items.map((w: Walk) => w.id)).toEqual([DEMO_WALK_IDS.approved]);
    const page = await clerk.agent.get('/api/walks?limit=1&offset=1');
    expect(page.body.total).toBe(2);
    expect(page.body.items).toHaveLength(1);
    expectInvalid(await clerk.agent.get('/api/walks?status=lost'), 'status');
    expectInvalid(await clerk.agent.get('/api/walks?limit=9999'), 'limit');
  });

  it('answers another organisation with 404 and an empty list', async () => {
    const other = await as('admin@quillwater.test');
    expectError(await other.agent.get(`/api/walks/${DEMO_WALK_IDS.submitted}`), 404, 'not_found');
    expectError(await other.agent.get(`/api/walks/${DEMO_WALK_IDS.submitted}/estimate`), 404, 'not_found');
    expect((await other.agent.get('/api/walks')).body).toEqual({ items: [], total: 0 });
  });
});

describe('submit, approve, reject', () => {
  it('moves a walk draft → submitted → approved, each step idempotent, and refuses the rest with 409', async () => {
    const sampler = await as('sampler@crowntip.test');
    const clerk = await as('clerk@crowntip.test');
    const walk = await createWalk(sampler, (await duePlanting(ORG1, 'cereal_rye')).plantingId);

    expectError(await post(clerk, `/api/walks/${walk.id}/approve`), 409, 'conflict'); // a draft is not reviewed
    expectError(await post(clerk, `/api/walks/${walk.id}/reject`, { reason: 'Too early.' }), 409, 'conflict');

    const submitted = await post(sampler, `/api/walks/${walk.id}/submit`);
    expect(submitted.status).toBe(200);
    expect(submitted.body.status).toBe('submitted');
    expect(submitted.body.submittedAt).toEqual(expect.any(String));
    const again = await post(sampler, `/api/walks/${walk.id}/submit`);
    expect(again.status).toBe(200);
    expect(again.body).toEqual(submitted.body);

    expectError(await post(sampler, `/api/walks/${walk.id}/approve`), 403, 'forbidden');
    expectError(await post(await as('auditor@crowntip.test'), `/api/walks/${walk.id}/approve`), 403, 'forbidden');

    const approved = await post(clerk, `/api/walks/${walk.id}/approve`);
    expect(approved.status).toBe(200);
    expect(approved.body).toMatchObject({ status: 'approved', reviewedBy: { id: userId('clerk@crowntip.test') }, rejectReason: null });
    const approvedAgain = await post(clerk, `/api/walks/${walk.id}/approve`);
    expect(approvedAgain.status).toBe(200);
    expect(approvedAgain.body).toEqual(approved.body);

    expectError(await post(clerk, `/api/walks/${walk.id}/reject`, { reason: 'Changed my mind.' }), 409, 'conflict');
    expectError(await post(sampler, `/api/walks/${walk.id}/submit`), 409, 'conflict');
    expectError(await upload(sampler, walk.id, 1, TINY_JPEG), 409, 'conflict');
  });

  it('rejects a submitted walk with a reason, once', async () => {
    const sampler = await as('sampler@crowntip.test');
    const admin = await as('admin@crowntip.test');
    const walk = await createWalk(sampler, (await duePlanting(ORG1, 'cereal_rye')).plantingId);
    await post(sampler, `/api/walks/${walk.id}/submit`);
    expectInvalid(await post(admin, `/api/walks/${walk.id}/reject`, {}), 'reason');
    expectInvalid(await post(admin, `/api/walks/${walk.id}/reject`, { reason: '   ' }), 'reason');
    const rejected = await post(admin, `/api/walks/${walk.id}/reject`, { reason: 'Stops bunched at the headland.' });
    expect(rejected.status).toBe(200);
    expect(rejected.body).toMatchObject({ status: 'rejected', rejectReason: 'Stops bunched at the headland.', reviewedBy: { id: userId('admin@crowntip.test') } });
    const repeat = await post(admin, `/api/walks/${walk.id}/reject`, { reason: 'Stops bunched at the headland.' });
    expect(repeat.status).toBe(200);
    expect(repeat.body).toEqual(rejected.body);
    expectError(await post(admin, `/api/walks/${walk.id}/approve`), 409, 'conflict');
    expectError(await post(sampler, `/api/walks/${walk.id}/submit`), 409, 'conflict');
  });

  it('lets only the author, a clerk or an admin submit; other organisations get 404', async () => {
    const sampler = await as('sampler@crowntip.test');
    const planting = await duePlanting(ORG1, 'triticale');
    const walk = await createWalk(sampler, planting.plantingId);
    const sampler2 = await as('sampler2@crowntip.test');
    expectError(await post(sampler2, `/api/walks/${walk.id}/submit`), 404, 'not_found');
    // Assigned to the planting, sampler2 may read the walk but still not submit it.
    await put(await as('clerk@crowntip.test'), `/api/plantings/${planting.plantingId}/assignment`, { samplerId: userId('sampler2@crowntip.test') });
    expectError(await post(sampler2, `/api/walks/${walk.id}/submit`), 403, 'forbidden');
    expectError(await post(await as('auditor@crowntip.test'), `/api/walks/${walk.id}/submit`), 403, 'forbidden');
    const foreign = await as('clerk@quillwater.test');
    for (const step of ['submit', 'approve']) expectError(await post(foreign, `/api/walks/${walk.id}/${step}`), 404, 'not_found');
    expectError(await post(foreign, `/api/walks/${walk.id}/reject`, { reason: 'No.' }), 404, 'not_found');
    const clerk = await as('clerk@crowntip.test');
    expect((await post(clerk, `/api/walks/${walk.id}/submit`)).body.status).toBe('submitted');
  });
});

describe('photos', () => {
  it('keeps a JPEG or PNG per stop under the uploads folder and serves it only inside the organisation', async () => {
    const sampler = await as('sampler@crowntip.test');
    const walk = await createWalk(sampler, (await duePlanting(ORG1, 'cereal_rye')).plantingId);

    const jpeg = await upload(sampler, walk.id, 1, TINY_JPEG);
    expect(jpeg.status, JSON.stringify(jpeg.body)).toBe(201);
    const photo = walkPhotoSchema.parse(jpeg.body);
    expect(photo).toMatchObject({ stop: 1, contentType: 'image/jpeg', size: TINY_JPEG.length, url: `/api/walks/${walk.id}/photos/${photo.id}` });
    const png = await upload(sampler, walk.id, 2, TINY_PNG, 'stop-2.png');
    expect(png.status).toBe(201);
    expect(png.body.contentType).toBe('image/png');

    const row = await t.db('walk_photos').where('id', photo.id).first();
    expect(row.path).toMatch(new RegExp(`^photos/${ORG1}/${walk.id}/1-[0-9a-f]+\\.jpg$`));
    expect(fs.readFileSync(path.join(uploads, row.path)).equals(TINY_JPEG)).toBe(true);

    const stored = walkSchema.parse((await sampler.agent.get(`/api/walks/${walk.id}`)).body);
    expect(stored.photos.map((p) => p.stop)).toEqual([1, 2]);

    for (const email of ['sampler@crowntip.test', 'clerk@crowntip.test', 'auditor@crowntip.test']) {
      const res = await (await as(email)).agent.get(photo.url).buffer(true).parse((r, cb) => {
        const chunks: Buffer[] = [];
        r.on('data', (c: Buffer) => chunks.push(c));
        r.on('end', () => cb(null, Buffer.concat(chunks)));
      });
      expect(res.status, email).toBe(200);
      expect(res.headers['content-type']).toBe('image/jpeg');
      expect(res.headers['cache-control']).toBe('no-store'); // never kept in a shared browser's cache (README, Security)
      expect((res.body as Buffer).equals(TINY_JPEG)).toBe(true);
    }
    expectError(await (await as('admin@quillwater.test')).agent.get(photo.url), 404, 'not_found');
    expectError(await (await as('sampler2@crowntip.test')).agent.get(photo.url), 404, 'not_found'); // neither author nor assigned
    expectError(await request(t.app).get(photo.url), 401, 'unauthenticated');
    expectError(await sampler.agent.get(`/api/walks/${walk.id}/photos/${randomUUID()}`), 404, 'not_found');
  });

  it('replaces the photo of a stop sent again: one row, the old file gone', async () => {
    const sampler = await as('sampler@crowntip.test');
    const walk = await createWalk(sampler, (await duePlanting(ORG1, 'cereal_rye')).plantingId);
    const first = await upload(sampler, walk.id, 3, TINY_JPEG);
    const firstPath = (await t.db('walk_photos').where('id', first.body.id).first()).path;
    const second = await upload(sampler, walk.id, 3, TINY_PNG, 'retake.png');
    expect(second.status).toBe(201);
    const rows = await t.db('walk_photos').where({ walk_id: walk.id, stop: 3 });
    expect(rows).toHaveLength(1);
    expect(rows[0].id).toBe(second.body.id);
    expect(fs.existsSync(path.join(uploads, firstPath))).toBe(false);
    expect(fs.existsSync(path.join(uploads, rows[0].path))).toBe(true);
    expect(fs.readdirSync(path.join(uploads, 'photos', ORG1, walk.id))).toHaveLength(1);
    expectError(await sampler.agent.get(first.body.url), 404, 'not_found');
  });

  it('refuses a text file named .jpg (415), 9 MB (413), a missing photo or stop (400)', async () => {
    const sampler = await as('sampler@crowntip.test');
    const walk = await createWalk(sampler, (await duePlanting(ORG1, 'cereal_rye')).plantingId);
    expectError(await upload(sampler, walk.id, 1, Buffer.from('These are not the pixels you are looking for.\n'), 'stop.jpg'), 415, 'unsupported_type');
    const big = Buffer.alloc(9 * 1024 * 1024, 0);
    TINY_JPEG.copy(big);
    expectError(await upload(sampler, walk.id, 1, big), 413, 'too_large');
    expectInvalid(await sampler.agent.post(`/api/walks/${walk.id}/photos`).set('X-CSRF-Token', sampler.csrf).field('stop', '1'), 'photo');
    expectInvalid(await sampler.agent.post(`/api/walks/${walk.id}/photos`).set('X-CSRF-Token', sampler.csrf).attach('photo', TINY_JPEG, 'a.jpg'), 'stop');
    expectInvalid(await upload(sampler, walk.id, 'two', TINY_JPEG), 'stop');
    expectInvalid(await upload(sampler, walk.id, 11, TINY_JPEG), 'stop'); // the walk has stops 1–10
    expect(await t.db('walk_photos').where('walk_id', walk.id).count({ n: '*' }).first()).toEqual({ n: 0 });
    expect(fs.existsSync(path.join(uploads, 'photos', ORG1, walk.id)) ? fs.readdirSync(path.join(uploads, 'photos', ORG1, walk.id)) : []).toEqual([]);
  });

  it('needs the CSRF header on the multipart upload (403 csrf)', async () => {
    const sampler = await as('sampler@crowntip.test');
    const walk = await createWalk(sampler, (await duePlanting(ORG1, 'cereal_rye')).plantingId);
    const res = await sampler.agent.post(`/api/walks/${walk.id}/photos`).field('stop', '1').field('_csrf', 'made-up').attach('photo', TINY_JPEG, 'a.jpg');
    expectError(res, 403, 'csrf');
    expect(await t.db('walk_photos').where('walk_id', walk.id).count({ n: '*' }).first()).toEqual({ n: 0 });
  });

  it('lets only the author, a clerk or an admin add photos', async () => {
    const sampler = await as('sampler@crowntip.test');
    const walk = await createWalk(sampler, (await duePlanting(ORG1, 'cereal_rye')).plantingId);
    expectError(await upload(await as('auditor@crowntip.test'), walk.id, 1, TINY_JPEG), 403, 'forbidden');
    expectError(await upload(await as('sampler2@crowntip.test'), walk.id, 1, TINY_JPEG), 404, 'not_found');
    expectError(await upload(await as('admin@quillwater.test'), walk.id, 1, TINY_JPEG), 404, 'not_found');
    expect((await upload(await as('clerk@crowntip.test'), walk.id, 1, TINY_JPEG)).status).toBe(201);
  });
});

describe('walk assignments', () => {
  it('assigns a planting to an active sampler of the organisation, re-dates it and takes it back', async () => {
    const clerk = await as('clerk@crowntip.test');
    const planting = await duePlanting(ORG1, 'oats');
    const sampler2 = userId('sampler2@crowntip.test');
    const res = await put(clerk, `/api/plantings/${planting.plantingId}/assignment`, { samplerId: sampler2, dueOn: '2027-02-01' });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.body).toMatchObject({ plantingId: planting.plantingId, samplerId: sampler2, samplerName: 'Teo Marquenda', dueOn: '2027-02-01' });
    const redated = await put(clerk, `/api/plantings/${planting.plantingId}/assignment`, { samplerId: sampler2, dueOn: null });
    expect(redated.body.dueOn).toBeNull();
    expect(await t.db('walk_assignments').where({ planting_id: planting.plantingId, sampler_id: sampler2 }).count({ n: '*' }).first()).toEqual({ n: 1 });

    expect((await del(clerk, `/api/plantings/${planting.plantingId}/assignment/${sampler2}`)).status).toBe(204);
    expectError(await del(clerk, `/api/plantings/${planting.plantingId}/assignment/${sampler2}`), 404, 'not_found');
  });

  it('refuses a non-sampler, another organisation and the wrong roles', async () => {
    const admin = await as('admin@crowntip.test');
    const planting = await duePlanting(ORG1, 'oats');
    const url = `/api/plantings/${planting.plantingId}/assignment`;
    expectInvalid(await put(admin, url, { samplerId: userId('clerk@crowntip.test') }), 'samplerId');
    expectInvalid(await put(admin, url, { samplerId: userId('sampler@quillwater.test') }), 'samplerId');
    expectInvalid(await put(admin, url, { samplerId: 'nobody' }), 'samplerId');
    expectInvalid(await put(admin, url, {}), 'samplerId');
    expectInvalid(await put(admin, url, { samplerId: userId('sampler2@crowntip.test'), dueOn: 'soon' }), 'dueOn');
    await t.db('users').where('id', userId('sampler2@crowntip.test')).update({ active: false });
    expectInvalid(await put(admin, url, { samplerId: userId('sampler2@crowntip.test') }), 'samplerId');

    const foreign = await duePlanting(ORG2, 'cereal_rye');
    expectError(await put(admin, `/api/plantings/${foreign.plantingId}/assignment`, { samplerId: userId('sampler@crowntip.test') }), 404, 'not_found');
    expectError(await del(admin, `/api/plantings/${foreign.plantingId}/assignment/${userId('sampler@quillwater.test')}`), 404, 'not_found');
    for (const email of ['sampler@crowntip.test', 'auditor@crowntip.test']) {
      expectError(await put(await as(email), url, { samplerId: userId('sampler@crowntip.test') }), 403, 'forbidden');
    }
  });
});

describe('GET /api/rules/current', () => {
  it('answers the rule in effect to every role', async () => {
    for (const email of ['admin@crowntip.test', 'clerk@crowntip.test', 'sampler@crowntip.test', 'auditor@crowntip.test']) {
      const res = await (await as(email)).agent.get('/api/rules/current');
      expect(res.status, email).toBe(200);
      expect(res.body).toMatchObject({
        thresholdKgHa: expect.any(Number),
        minDaysInWindow: expect.any(Number),
        window: { start: expect.stringMatching(/^\d\d-\d\d$/), end: expect.stringMatching(/^\d\d-\d\d$/) },
        eligibleCrops: expect.arrayContaining(['cereal_rye']),
        creditKgNPerHa: expect.any(Number),
        maxDaysSampleBeforeTermination: expect.any(Number),
        label: expect.any(String),
      });
    }
  });
});

describe('demo walks and the season view', () => {
  it('seeds a submitted and an approved walk, and the season view shows each planting’s latest walk status', async () => {
    const rows = await seasonRows(t.db, ORG1, {
      season: seasonOfDate(todayIso()),
      today: todayIso(),
      rule: { window: { start: '10-01', end: '03-31' } },
    });
    const walks = await t.db('field_walks').whereIn('id', Object.values(DEMO_WALK_IDS));
    expect(walks.map((w) => w.status).sort()).toEqual(['approved', 'submitted']);
    for (const w of walks) expect(rows.find((r) => r.plantingId === w.planting_id)?.walkStatus).toBe(w.status);
    expect(rows.filter((r) => r.walkStatus !== 'none')).toHaveLength(2);
    const page = await signInPages(t.app, 'clerk@crowntip.test');
    const html = (await page.get('/registry/season')).text;
    expect(html).toContain('<td>approved</td>');
    expect(html).toContain('<td>submitted</td>');
  });
});
