import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import request from 'supertest';
import { createTestApp, signInApi, type TestApp } from '../../helpers/app';
import { CM_PER_IN, compareModels, fitCalibration, lengthForBiomass, predict, type Fit } from '../../../shared/calc';
import { assignedCalibrationFor } from '../../../server/calibrations/db';
import { DEMO_CALIBRATION_LABEL, demoCalibrationId } from '../../../seeds/03_demo_calibrations';
import { DEMO_ORGANISATIONS } from '../../../seeds/demo-people';
import { readDemo } from '../../shared/demo-data';
import { at, only } from '../../helpers/lists';

const RYE = demoCalibrationId('c', '1', 0);
const TRITICALE = demoCalibrationId('c', '2', 0);
const BARLEY_DRAFT = demoCalibrationId('c', '3', 0);
const OTHER_ORG_RYE = demoCalibrationId('c', '1', 1);
const ORG1 = DEMO_ORGANISATIONS[0].id;

let t: TestApp;
beforeEach(async () => {
  t = await createTestApp();
});
afterEach(async () => {
  await t.close();
});

const as = (email: string) => signInApi(t.app, email);
const ryePoints = () => readDemo('cereal-rye').rows.map(({ x, y }) => ({ x, y }));

describe('GET /api/calibrations', () => {
  it('401 signed out; every role of the organisation reads the published versions', async () => {
    expect((await request(t.app).get('/api/calibrations')).status).toBe(401);
    for (const email of ['admin@crowntip.test', 'clerk@crowntip.test', 'sampler@crowntip.test', 'auditor@crowntip.test']) {
      const { agent } = await as(email);
      const res = await agent.get('/api/calibrations');
      expect(res.status, email).toBe(200);
      expect(res.body.total).toBe(2);
      expect(res.body.items.map((c: { id: string }) => c.id).sort()).toEqual([RYE, TRITICALE].sort());
    }
  });

  it('answers the API.md shape plus the full fit, label, publishedAt and assigned', async () => {
    const { agent } = await as('sampler@crowntip.test');
    const res = await agent.get('/api/calibrations?crop=cereal_rye');
    expect(res.body.total).toBe(1);
    const c = res.body.items[0];
    for (const key of ['id', 'crop', 'variety', 'region', 'version', 'model', 'coefficients', 'n', 'rSquared', 'residualStdError', 'xRange', 'fit', 'label', 'publishedAt', 'assigned']) {
      expect(c, key).toHaveProperty(key);
    }
    expect(c).toMatchObject({ crop: 'cereal_rye', variety: null, region: 'Demo valley', version: 1, model: 'power', label: DEMO_CALIBRATION_LABEL, assigned: true, status: 'published' });
    const fit = fitCalibration(ryePoints(), 'power');
    expect(c.coefficients).toEqual(fit.coefficients);
    expect(c.rSquared).toBe(fit.rSquared);
    expect(c.residualStdError).toBe(fit.residualStdError);
    expect(c.n).toBe(fit.n);
    expect(c.xRange).toEqual(fit.xRange);
    // The phone estimates offline from the fit as sent.
    expect(predict(c.fit as Fit, 79)).toBe(predict(fit, 79));
  });

  it('drafts only for admins; bad filters are 400 with fields', async () => {
    const admin = await as('admin@crowntip.test');
    const drafts = await admin.agent.get('/api/calibrations?status=draft');
    expect(drafts.body.items.map((c: { id: string }) => c.id)).toEqual([BARLEY_DRAFT]);
    expect((await admin.agent.get('/api/calibrations?status=all')).body.total).toBe(3);
    const clerk = await as('clerk@crowntip.test');
    expect((await clerk.agent.get('/api/calibrations?status=draft')).status).toBe(403);
    expect((await clerk.agent.get('/api/calibrations?status=all')).body.total).toBe(2);
    const bad = await clerk.agent.get('/api/calibrations?status=secret&limit=9999');
    expect(bad.status).toBe(400);
    expect(bad.body.error.code).toBe('invalid');
    expect(Object.keys(bad.body.error.fields).sort()).toEqual(['limit', 'status']);
  });

  it('another organisation sees only its own', async () => {
    const { agent } = await as('admin@quillwater.test');
    const res = await agent.get('/api/calibrations?status=all');
    expect(res.body.items.map((c: { id: string }) => c.id)).toContain(OTHER_ORG_RYE);
    expect(res.body.items.map((c: { id: string }) => c.id)).not.toContain(RYE);
    expect((await agent.get(`/api/calibrations/${RYE}`)).status).toBe(404);
    expect((await agent.get(`/api/calibrations/${RYE}/table`)).status).toBe(404);
  });
});

describe('GET /api/calibrations/:id', () => {
  it('the full record with its points for any role; a draft only for admins', async () => {
    expect((await request(t.app).get(`/api/calibrations/${RYE}`)).status).toBe(401);
    const auditor = await as('auditor@crowntip.test');
    const res = await auditor.agent.get(`/api/calibrations/${RYE}`);
    expect(res.status).toBe(200);
    expect(res.body.dataset.points).toHaveLength(150);
    expect(res.body.dataset.points[0]).toEqual({ x: 61, y: 3551, site: 'Demo plot 2', note: 'demo data (invented)' });
    expect(res.body.assignments).toEqual([expect.objectContaining({ crop: 'cereal_rye', variety: null })]);
    expect((await auditor.agent.get(`/api/calibrations/${BARLEY_DRAFT}`)).status).toBe(404);
    expect((await auditor.agent.get('/api/calibrations/not-an-id')).status).toBe(404);
    const admin = await as('admin@crowntip.test');
    expect((await admin.agent.get(`/api/calibrations/${BARLEY_DRAFT}`)).body.status).toBe('draft');
  });
});

describe('POST /api/calibrations/fit and /compare', () => {
  it('401, 403 for sampler and auditor, 403 csrf without the token', async () => {
    const body = { points: ryePoints(), model: 'power' };
    expect((await request(t.app).post('/api/calibrations/fit').send(body)).status).toBe(401); // signed out: told to sign in before any token check
    for (const email of ['sampler@crowntip.test', 'auditor@crowntip.test']) {
      const { agent, csrf } = await as(email);
      const res = await agent.post('/api/calibrations/fit').set('X-CSRF-Token', csrf).send(body);
      expect(res.status, email).toBe(403);
      expect(res.body.error.code).toBe('forbidden');
    }
    const { agent } = await as('clerk@crowntip.test');
    const noToken = await agent.post('/api/calibrations/fit').send(body);
    expect(noToken.status).toBe(403);
    expect(noToken.body.error.code).toBe('csrf');
  });

  it('returns exactly the core’s fit for clerk and admin, without saving', async () => {
    const points = ryePoints();
    for (const email of ['clerk@crowntip.test', 'admin@crowntip.test']) {
      const { agent, csrf } = await as(email);
      for (const model of ['linear', 'power', 'exponential', 'quadratic'] as const) {
        const res = await agent.post('/api/calibrations/fit').set('X-CSRF-Token', csrf).send({ points, model });
        expect(res.status).toBe(200);
        expect(res.body).toEqual(JSON.parse(JSON.stringify(fitCalibration(points, model))));
      }
    }
    const count = await t.db('calibrations').count({ n: '*' }).first();
    expect(Number(count!.n)).toBe(5); // the seeded ones only
    const { agent, csrf } = await as('clerk@crowntip.test');
    const cmp = await agent.post('/api/calibrations/compare').set('X-CSRF-Token', csrf).send({ points });
    expect(cmp.status).toBe(200);
    expect(cmp.body).toEqual(JSON.parse(JSON.stringify(compareModels(points))));
  });

  it('400 with fields for bad bodies and for points the model cannot take', async () => {
    const { agent, csrf } = await as('clerk@crowntip.test');
    const post = (body: unknown) => agent.post('/api/calibrations/fit').set('X-CSRF-Token', csrf).send(body as object);
    const cases: [unknown, string][] = [
      [{ points: ryePoints(), model: 'cubic' }, 'model'],
      [{ points: 'many', model: 'linear' }, 'points'],
      [{ points: [{ x: 'a', y: 1 }], model: 'linear' }, 'points.0.x'],
      [{ points: [], model: 'linear' }, 'points'],
      [{ points: [{ x: 1, y: 1 }, { x: 2, y: 2 }, { x: 3, y: 3 }], model: 'quadratic' }, 'points'], // too few
      [{ points: [{ x: 10, y: 0 }, { x: 20, y: 5 }, { x: 30, y: 9 }], model: 'power' }, 'points'], // y = 0 on a log scale
      [{ points: [{ x: 10, y: 1 }, { x: 10, y: 2 }, { x: 10, y: 3 }], model: 'linear' }, 'points'], // one length
    ];
    for (const [body, field] of cases) {
      const res = await post(body);
      expect(res.status, JSON.stringify(body).slice(0, 80)).toBe(400);
      expect(res.body.error.code).toBe('invalid');
      expect(res.body.error.fields, JSON.stringify(res.body)).toHaveProperty([field]);
    }
  });
});

describe('drafts: create, change, delete', () => {
  const newDraft = (points = ryePoints()) => ({ crop: 'wheat', variety: 'Demo red', region: 'Test valley', name: 'API points', points, lengthUnit: 'in', biomassUnit: 'lb_ac' });

  it('an admin creates a draft with the recommended model; others may not', async () => {
    const clerk = await as('clerk@crowntip.test');
    expect((await clerk.agent.post('/api/calibrations').set('X-CSRF-Token', clerk.csrf).send(newDraft())).status).toBe(403);
    const { agent, csrf } = await as('admin@crowntip.test');
    const res = await agent.post('/api/calibrations').set('X-CSRF-Token', csrf).send(newDraft());
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject({ status: 'draft', crop: 'wheat', variety: 'Demo red', region: 'Test valley', version: null, n: 150 });
    expect(res.body.model).toBe(compareModels(ryePoints()).recommendation.model);
    const full = await agent.get(`/api/calibrations/${res.body.id}`);
    expect(full.body.dataset).toMatchObject({ name: 'API points', lengthUnit: 'in', biomassUnit: 'lb_ac', rowCount: 150 });
  });

  it('400 with fields for an unknown crop, too few or impossible points', async () => {
    const { agent, csrf } = await as('admin@crowntip.test');
    const post = (body: object) => agent.post('/api/calibrations').set('X-CSRF-Token', csrf).send(body);
    const unknownCrop = await post({ ...newDraft(), crop: 'maize' });
    expect(unknownCrop.status).toBe(400);
    expect(unknownCrop.body.error.fields).toHaveProperty('crop');
    const few = await post(newDraft(ryePoints().slice(0, 3)));
    expect(few.body.error.fields).toHaveProperty('points');
    const negative = await post(newDraft([...ryePoints().slice(0, 5), { x: -1, y: 100 }]));
    expect(negative.body.error.fields).toHaveProperty(['points.5.x']);
    const missing = await post({ points: ryePoints() });
    expect(Object.keys(missing.body.error.fields).sort()).toEqual(['crop', 'name']);
  });

  it('PATCH changes a draft’s model (refitted) and description; DELETE removes it', async () => {
    const { agent, csrf } = await as('admin@crowntip.test');
    const res = await agent.patch(`/api/calibrations/${BARLEY_DRAFT}`).set('X-CSRF-Token', csrf).send({ model: 'linear', variety: 'Demo six-row', label: 'work in progress' });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ model: 'linear', variety: 'Demo six-row', label: 'work in progress', status: 'draft' });
    const barley = readDemo('barley').rows.map(({ x, y }) => ({ x, y }));
    expect(res.body.fit).toEqual(JSON.parse(JSON.stringify(fitCalibration(barley, 'linear'))));
    const bad = await agent.patch(`/api/calibrations/${BARLEY_DRAFT}`).set('X-CSRF-Token', csrf).send({ points: [] });
    expect(bad.status).toBe(400);
    expect(bad.body.error.code).toBe('invalid');
    expect((await agent.delete(`/api/calibrations/${BARLEY_DRAFT}`).set('X-CSRF-Token', csrf)).status).toBe(204);
    expect((await agent.get(`/api/calibrations/${BARLEY_DRAFT}`)).status).toBe(404);
    expect(await t.db('calibration_datasets').where('id', demoCalibrationId('d', '3', 0)).first()).toBeUndefined();
  });

  it('403 for a clerk, 404 for another organisation’s draft', async () => {
    const clerk = await as('clerk@crowntip.test');
    expect((await clerk.agent.patch(`/api/calibrations/${BARLEY_DRAFT}`).set('X-CSRF-Token', clerk.csrf).send({ label: 'x' })).status).toBe(403);
    expect((await clerk.agent.delete(`/api/calibrations/${BARLEY_DRAFT}`).set('X-CSRF-Token', clerk.csrf)).status).toBe(403);
    const other = await as('admin@quillwater.test');
    expect((await other.agent.patch(`/api/calibrations/${BARLEY_DRAFT}`).set('X-CSRF-Token', other.csrf).send({ label: 'x' })).status).toBe(404);
    expect((await other.agent.delete(`/api/calibrations/${BARLEY_DRAFT}`).set('X-CSRF-Token', other.csrf)).status).toBe(404);
    expect((await other.agent.post(`/api/calibrations/${BARLEY_DRAFT}/publish`).set('X-CSRF-Token', other.csrf).send({ model: 'power', label: 'x' })).status).toBe(404);
    expect((await other.agent.post(`/api/calibrations/${RYE}/retire`).set('X-CSRF-Token', other.csrf)).status).toBe(404);
  });
});

describe('publish and retire', () => {
  it('publishes a draft as the next version with the chosen model; then it never changes (409)', async () => {
    const { agent, csrf } = await as('admin@crowntip.test');
    const res = await agent.post(`/api/calibrations/${BARLEY_DRAFT}/publish`).set('X-CSRF-Token', csrf).send({ model: 'linear', label: 'Barley trial 1' });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ status: 'published', version: 1, label: 'Barley trial 1', model: 'linear', assigned: false, publishedBy: 'Noor Halvane' });
    const barley = readDemo('barley').rows.map(({ x, y }) => ({ x, y }));
    expect(res.body.fit).toEqual(JSON.parse(JSON.stringify(fitCalibration(barley, 'linear'))));
    expect(res.body.publishedAt).toMatch(/^\d{4}-\d{2}-\d{2}T/);

    const before = await agent.get(`/api/calibrations/${BARLEY_DRAFT}`);
    const attempts = [
      agent.post(`/api/calibrations/${BARLEY_DRAFT}/publish`).set('X-CSRF-Token', csrf).send({ model: 'power', label: 'again' }),
      agent.patch(`/api/calibrations/${BARLEY_DRAFT}`).set('X-CSRF-Token', csrf).send({ model: 'power' }),
      agent.patch(`/api/calibrations/${BARLEY_DRAFT}`).set('X-CSRF-Token', csrf).send({ fit: { coefficients: [1, 2] } }),
      agent.put(`/api/calibrations/${BARLEY_DRAFT}`).set('X-CSRF-Token', csrf).send({ label: 'renamed' }),
      agent.delete(`/api/calibrations/${BARLEY_DRAFT}`).set('X-CSRF-Token', csrf),
      agent.post(`/api/calibrations/${RYE}/publish`).set('X-CSRF-Token', csrf).send({ model: 'linear', label: 'x' }),
      agent.patch(`/api/calibrations/${RYE}`).set('X-CSRF-Token', csrf).send({ points: [] }),
    ];
    for (const attempt of attempts) {
      const r = await attempt;
      expect(r.status).toBe(409);
      expect(r.body.error.code).toBe('conflict');
    }
    expect((await agent.get(`/api/calibrations/${BARLEY_DRAFT}`)).body).toEqual(before.body);
  });

  it('400 with fields for a missing label or model; 403 for a clerk', async () => {
    const { agent, csrf } = await as('admin@crowntip.test');
    const res = await agent.post(`/api/calibrations/${BARLEY_DRAFT}/publish`).set('X-CSRF-Token', csrf).send({ model: 'cubic', label: ' ' });
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.error.fields).sort()).toEqual(['label', 'model']);
    const clerk = await as('clerk@crowntip.test');
    expect((await clerk.agent.post(`/api/calibrations/${BARLEY_DRAFT}/publish`).set('X-CSRF-Token', clerk.csrf).send({ model: 'power', label: 'x' })).status).toBe(403);
    expect((await clerk.agent.post(`/api/calibrations/${TRITICALE}/retire`).set('X-CSRF-Token', clerk.csrf)).status).toBe(403);
    expect((await request(t.app).post(`/api/calibrations/${TRITICALE}/retire`)).status).toBe(401); // signed out: told to sign in before any token check
  });

  it('version numbers count per crop, variety and region; a correction is a new version', async () => {
    const { agent, csrf } = await as('admin@crowntip.test');
    const draft = await agent.post(`/api/calibrations/${RYE}/drafts`).set('X-CSRF-Token', csrf);
    expect(draft.status).toBe(201);
    expect(draft.body).toMatchObject({ status: 'draft', crop: 'cereal_rye', region: 'Demo valley', version: null, datasetId: demoCalibrationId('d', '1', 0) });
    const v2 = await agent.post(`/api/calibrations/${draft.body.id}/publish`).set('X-CSRF-Token', csrf).send({ model: 'exponential', label: 'Refit', assign: true });
    expect(v2.body).toMatchObject({ version: 2, assigned: true });
    const v1 = await agent.get(`/api/calibrations/${RYE}`);
    expect(v1.body).toMatchObject({ version: 1, assigned: false, model: 'power' });
  });

  it('retiring refuses while estimates use the version, then keeps it readable', async () => {
    const { agent, csrf } = await as('admin@crowntip.test');
    const inUse = await agent.post(`/api/calibrations/${RYE}/retire`).set('X-CSRF-Token', csrf);
    expect(inUse.status).toBe(409);
    expect(inUse.body.error.message).toMatch(/Cereal rye/);
    const draftRetire = await agent.post(`/api/calibrations/${BARLEY_DRAFT}/retire`).set('X-CSRF-Token', csrf);
    expect(draftRetire.status).toBe(409);

    expect((await agent.delete('/api/calibrations/assignments?crop=cereal_rye').set('X-CSRF-Token', csrf)).status).toBe(204);
    const retired = await agent.post(`/api/calibrations/${RYE}/retire`).set('X-CSRF-Token', csrf);
    expect(retired.status).toBe(200);
    expect(retired.body).toMatchObject({ status: 'retired', retiredBy: 'Noor Halvane', version: 1 });
    expect((await agent.post(`/api/calibrations/${RYE}/retire`).set('X-CSRF-Token', csrf)).status).toBe(409);
    expect((await agent.patch(`/api/calibrations/${RYE}`).set('X-CSRF-Token', csrf).send({ label: 'x' })).status).toBe(409);

    const clerk = await as('clerk@crowntip.test');
    expect((await clerk.agent.get('/api/calibrations')).body.items.map((c: { id: string }) => c.id)).toEqual([TRITICALE]);
    expect((await clerk.agent.get('/api/calibrations?status=retired')).body.items[0]).toMatchObject({ id: RYE, fit: expect.any(Object) });
    expect((await clerk.agent.get(`/api/calibrations/${RYE}`)).status).toBe(200);
    // A retired version cannot be assigned again.
    const reassign = await agent.put('/api/calibrations/assignments').set('X-CSRF-Token', csrf).send({ crop: 'cereal_rye', calibrationId: RYE });
    expect(reassign.status).toBe(400);
    expect(reassign.body.error.fields).toHaveProperty('calibrationId');
  });
});

describe('assignments', () => {
  it('everyone reads them; only admins set or remove them', async () => {
    expect((await request(t.app).get('/api/calibrations/assignments')).status).toBe(401);
    const sampler = await as('sampler@crowntip.test');
    const list = await sampler.agent.get('/api/calibrations/assignments');
    expect(list.status).toBe(200);
    expect(list.body.items.map((a: { crop: string; variety: string | null; calibrationId: string }) => [a.crop, a.variety, a.calibrationId])).toEqual([
      ['cereal_rye', null, RYE],
      ['triticale', null, TRITICALE],
    ]);
    const clerk = await as('clerk@crowntip.test');
    expect((await clerk.agent.put('/api/calibrations/assignments').set('X-CSRF-Token', clerk.csrf).send({ crop: 'triticale', calibrationId: TRITICALE })).status).toBe(403);
    expect((await clerk.agent.delete('/api/calibrations/assignments?crop=triticale').set('X-CSRF-Token', clerk.csrf)).status).toBe(403);
  });

  it('400 with fields for bad bodies, another crop’s or organisation’s calibration, a draft', async () => {
    const { agent, csrf } = await as('admin@crowntip.test');
    const put = (body: object) => agent.put('/api/calibrations/assignments').set('X-CSRF-Token', csrf).send(body);
    const cases: [object, string][] = [
      [{}, 'crop'],
      [{ crop: 'maize', calibrationId: RYE }, 'crop'],
      [{ crop: 'triticale', calibrationId: RYE }, 'calibrationId'],
      [{ crop: 'cereal_rye', calibrationId: OTHER_ORG_RYE }, 'calibrationId'],
      [{ crop: 'barley', calibrationId: BARLEY_DRAFT }, 'calibrationId'],
    ];
    for (const [body, field] of cases) {
      const res = await put(body);
      expect(res.status, JSON.stringify(body)).toBe(400);
      expect(res.body.error.fields).toHaveProperty(field);
    }
    expect((await agent.delete('/api/calibrations/assignments?crop=oats').set('X-CSRF-Token', csrf)).status).toBe(404);
    expect((await agent.delete('/api/calibrations/assignments').set('X-CSRF-Token', csrf)).status).toBe(400);
  });

  it('assignedCalibrationFor: the variety’s own first (any case), else the crop’s; only published', async () => {
    const { agent, csrf } = await as('admin@crowntip.test');
    const draft = await agent.post(`/api/calibrations/${RYE}/drafts`).set('X-CSRF-Token', csrf);
    await agent.post(`/api/calibrations/${draft.body.id}/publish`).set('X-CSRF-Token', csrf).send({ model: 'linear', label: 'For Ridgeline' });
    const set = await agent.put('/api/calibrations/assignments').set('X-CSRF-Token', csrf).send({ crop: 'cereal_rye', variety: ' Ridgeline ', calibrationId: draft.body.id });
    expect(set.status).toBe(200);
    expect(set.body).toMatchObject({ crop: 'cereal_rye', variety: 'Ridgeline', calibrationId: draft.body.id, version: 2, label: 'For Ridgeline', assignedBy: 'Noor Halvane' });

    const ridgeline = await assignedCalibrationFor(t.db, ORG1, 'cereal_rye', 'rIDGELINE');
    expect(ridgeline).toMatchObject({ id: draft.body.id, version: 2, model: 'linear', assignedFor: { crop: 'cereal_rye', variety: 'Ridgeline' } });
    expect(predict(ridgeline!.fit, 80)).toBeGreaterThan(0);
    expect(await assignedCalibrationFor(t.db, ORG1, 'cereal_rye', 'Wheeler')).toMatchObject({ id: RYE, version: 1, assignedFor: { variety: null } });
    expect(await assignedCalibrationFor(t.db, ORG1, 'cereal_rye')).toMatchObject({ id: RYE });
    expect(await assignedCalibrationFor(t.db, ORG1, 'oats')).toBeUndefined();
    expect(await assignedCalibrationFor(t.db, DEMO_ORGANISATIONS[1].id, 'cereal_rye', 'Ridgeline')).toMatchObject({ id: OTHER_ORG_RYE });

    // Setting the same variety again (other spelling) replaces it rather than adding one.
    await agent.put('/api/calibrations/assignments').set('X-CSRF-Token', csrf).send({ crop: 'cereal_rye', variety: 'RIDGELINE', calibrationId: RYE });
    const all = await agent.get('/api/calibrations/assignments');
    expect(all.body.total).toBe(3);
    expect((await assignedCalibrationFor(t.db, ORG1, 'cereal_rye', 'Ridgeline'))!.id).toBe(RYE);
    expect((await agent.delete('/api/calibrations/assignments?crop=cereal_rye&variety=ridgeline').set('X-CSRF-Token', csrf)).status).toBe(204);
    expect((await agent.get('/api/calibrations/assignments')).body.total).toBe(2);
  });
});

describe('GET /api/calibrations/:id/table', () => {
  it('rows in the asked unit; the threshold row is the step at or just above lengthForBiomass', async () => {
    const { agent } = await as('sampler@crowntip.test');
    for (const [unit, step, perUnit] of [['in', 1, CM_PER_IN], ['cm', 2, 1]] as const) {
      const res = await agent.get(`/api/calibrations/${TRITICALE}/table?unit=${unit}`);
      expect(res.status).toBe(200);
      expect(res.body).toMatchObject({ unit, step, version: 1 });
      const fit = (await agent.get(`/api/calibrations/${TRITICALE}`)).body.fit as Fit;
      const reach = lengthForBiomass(fit, res.body.thresholdKgHa);
      if (!reach.ok) throw new Error('triticale demo curve should reach the threshold');
      expect(res.body.thresholdLengthCm).toBe(reach.x);
      const rows = res.body.items as { length: number; threshold: boolean; biomassKgHa: number; extrapolated: boolean }[];
      const marked = only(rows.filter((r) => r.threshold), 'threshold row');
      expect(marked.length).toBe(Math.ceil(reach.x / perUnit / step - 1e-9) * step);
      expect(marked.biomassKgHa).toBeGreaterThanOrEqual(res.body.thresholdKgHa);
      expect(rows.indexOf(marked)).toBeGreaterThan(0);
      const before = at(rows, rows.indexOf(marked) - 1, 'row below the threshold');
      expect(before.biomassKgHa).toBeLessThan(res.body.thresholdKgHa);
      // The triticale rule of thumb: about 27 in (69 cm) for 4,500 lb/ac (product brief).
      expect(Math.abs(reach.x - 69)).toBeLessThan(4);
    }
    const bad = await agent.get(`/api/calibrations/${TRITICALE}/table?unit=ft&from=0`);
    expect(bad.status).toBe(400);
    expect(Object.keys(bad.body.error.fields).sort()).toEqual(['from', 'unit']);
  });
});
