import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import request from 'supertest';
import { createTestApp, signInApi, type TestApp } from '../../helpers/app';
import { seasonOfDate, todayIso } from '../../../shared/registry/season';

// The registry JSON API (README, "API"). Every test makes its own invented records
// through the API; the demo scenario may hold ranches of its own, so counts are taken relative.

let t: TestApp;
beforeEach(async () => {
  t = await createTestApp();
});
afterEach(async () => {
  await t.close();
});

type Client = Awaited<ReturnType<typeof signInApi>>;
const as = (email: string) => signInApi(t.app, email);
const post = (c: Client, path: string, body: unknown) => c.agent.post(path).set('X-CSRF-Token', c.csrf).send(body as object);
const patch = (c: Client, path: string, body: unknown) => c.agent.patch(path).set('X-CSRF-Token', c.csrf).send(body as object);
const del = (c: Client, path: string) => c.agent.delete(path).set('X-CSRF-Token', c.csrf);

/**
 * A 0.001° × 0.001° square with its south-west corner at 36° N, 135° W (open sea, invented). By hand, on turf's sphere
 * (R = 6 378 137 m): 0.001° of latitude = R·π/180·0.001 ≈ 111.32 m; 0.001° of longitude at the
 * middle latitude 36.0005° ≈ 111.32 m × cos 36.0005° ≈ 90.06 m; area ≈ 10 025 m² ≈ 1.0025 ha.
 */
const SQUARE_RING: [number, number][] = [
  [-135.0, 36.0],
  [-134.999, 36.0],
  [-134.999, 36.001],
  [-135.0, 36.001],
  [-135.0, 36.0],
];
const SQUARE = { type: 'Polygon', coordinates: [SQUARE_RING] };
const SQUARE_HA_BY_HAND = 1.0025;

async function makeRanch(c: Client, name = 'Thistlecombe Ranch', extra: object = {}) {
  const res = await post(c, '/api/ranches', { name, ...extra });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body as { id: string; name: string };
}
async function makeField(c: Client, ranchId: string, name = 'North Bench', extra: object = {}) {
  const res = await post(c, '/api/fields', { ranchId, name, areaHa: 4.5, ...extra });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body as { id: string; name: string; areaHa: number };
}
async function makePlanting(c: Client, fieldId: string, extra: object = {}) {
  const res = await post(c, '/api/plantings', { fieldId, season: '2026-27', crop: 'cereal_rye', seededOn: '2026-10-20', ...extra });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body as { id: string };
}
/** One ranch with one field with one planting, made by the org-1 clerk. */
async function makeChain(c: Client) {
  const ranch = await makeRanch(c);
  const field = await makeField(c, ranch.id);
  const planting = await makePlanting(c, field.id);
  return { ranch, field, planting };
}
const historyOf = async (c: Client, entityId: string) => (await c.agent.get(`/api/history?entityId=${entityId}`)).body;

function expectInvalid(res: request.Response, field: string | RegExp) {
  expect(res.status, JSON.stringify(res.body)).toBe(400);
  expect(res.body.error.code).toBe('invalid');
  const keys = Object.keys(res.body.error.fields ?? {});
  if (typeof field === 'string') expect(keys).toContain(field);
  else expect(keys.some((k) => field.test(k)), keys.join(', ')).toBe(true);
}

describe('signed out', () => {
  it('answers every registry route with 401', async () => {
    const { agent, body } = await (async () => {
      // A signed-out client still gets a CSRF token, so the 401 is about the sign-in, not the token.
      const a = request.agent(t.app);
      const r = await a.get('/api/session');
      return { agent: a, body: r.body as { csrfToken: string } };
    })();
    const routes: ['get' | 'post' | 'patch' | 'delete', string][] = [
      ['get', '/api/ranches'],
      ['post', '/api/ranches'],
      ['get', '/api/ranches/any'],
      ['patch', '/api/ranches/any'],
      ['delete', '/api/ranches/any'],
      ['get', '/api/fields'],
      ['post', '/api/fields'],
      ['get', '/api/fields/any'],
      ['patch', '/api/fields/any'],
      ['get', '/api/plantings'],
      ['post', '/api/plantings'],
      ['get', '/api/plantings/any'],
      ['patch', '/api/plantings/any'],
      ['get', '/api/crops'],
      ['get', '/api/history'],
    ];
    for (const [method, path] of routes) {
      const req = agent[method](path);
      const res = method === 'get' ? await req : await req.set('X-CSRF-Token', body.csrfToken).send({});
      expect(res.status, `${method} ${path}`).toBe(401);
      expect(res.body.error.code).toBe('unauthenticated');
    }
  });
});

describe('roles', () => {
  it('lets the sampler read every registry route but not write, nor read the history', async () => {
    const clerk = await as('clerk@crowntip.test');
    const { ranch, field, planting } = await makeChain(clerk);
    const sampler = await as('sampler@crowntip.test');
    for (const path of [
      '/api/ranches',
      `/api/ranches/${ranch.id}`,
      `/api/fields?ranchId=${ranch.id}`,
      `/api/fields/${field.id}`,
      `/api/plantings?fieldId=${field.id}`,
      `/api/plantings/${planting.id}`,
      '/api/crops',
    ]) {
      expect((await sampler.agent.get(path)).status, path).toBe(200);
    }
    const history = await sampler.agent.get('/api/history');
    expect(history.status).toBe(403);
    expect(history.body.error.code).toBe('forbidden');
  });

  it.each(['sampler@crowntip.test', 'auditor@crowntip.test'])('refuses every write by %s with 403 and changes nothing', async (email) => {
    const clerk = await as('clerk@crowntip.test');
    const { ranch, field, planting } = await makeChain(clerk);
    const reader = await as(email);
    const writes: ['post' | 'patch' | 'delete', string, object][] = [
      ['post', '/api/ranches', { name: 'Foxglove Hollow' }],
      ['patch', `/api/ranches/${ranch.id}`, { name: 'Renamed' }],
      ['delete', `/api/ranches/${ranch.id}`, {}],
      ['post', '/api/fields', { ranchId: ranch.id, name: 'South Bench', areaHa: 2 }],
      ['patch', `/api/fields/${field.id}`, { areaHa: 9 }],
      ['post', '/api/plantings', { fieldId: field.id, season: '2027-28', crop: 'oats', seededOn: '2027-10-01' }],
      ['patch', `/api/plantings/${planting.id}`, { crop: 'oats' }],
    ];
    for (const [method, path, body] of writes) {
      const req = reader.agent[method](path);
      const res = await req.set('X-CSRF-Token', reader.csrf).send(body);
      expect(res.status, `${method} ${path}`).toBe(403);
      expect(res.body.error.code).toBe('forbidden');
    }
    expect((await clerk.agent.get(`/api/ranches/${ranch.id}`)).body.name).toBe('Thistlecombe Ranch');
    expect((await clerk.agent.get(`/api/fields/${field.id}`)).body.areaHa).toBe(4.5);
    expect((await clerk.agent.get(`/api/plantings/${planting.id}`)).body.crop).toBe('cereal_rye');
    expect((await clerk.agent.get(`/api/plantings?fieldId=${field.id}`)).body.total).toBe(1);
    expect((await clerk.agent.get('/api/ranches?q=foxglove')).body.total).toBe(0);
  });

  it('lets the admin write and the auditor read the history', async () => {
    const admin = await as('admin@crowntip.test');
    const ranch = await makeRanch(admin, 'Larkspur Flats');
    const auditor = await as('auditor@crowntip.test');
    const res = await auditor.agent.get(`/api/history?entityType=ranch&entityId=${ranch.id}`);
    expect(res.status).toBe(200);
    expect(res.body.total).toBe(1);
    expect(res.body.items[0]).toMatchObject({ action: 'create', userName: expect.any(String), before: null });
  });
});

describe('CSRF', () => {
  it('refuses a write without the X-CSRF-Token header with 403 csrf', async () => {
    const clerk = await as('clerk@crowntip.test');
    const res = await clerk.agent.post('/api/ranches').send({ name: 'Wrenfield Ranch' });
    expect(res.status).toBe(403);
    expect(res.body.error.code).toBe('csrf');
    expect((await clerk.agent.get('/api/ranches?q=wrenfield')).body.total).toBe(0);
    const { ranch } = await makeChain(clerk);
    expect((await clerk.agent.delete(`/api/ranches/${ranch.id}`)).body.error.code).toBe('csrf');
    expect((await clerk.agent.patch(`/api/ranches/${ranch.id}`).send({ name: 'X' })).body.error.code).toBe('csrf');
  });
});

describe('validation', () => {
  it('answers bad bodies with 400 invalid naming the field', async () => {
    const clerk = await as('clerk@crowntip.test');
    const { ranch, field, planting } = await makeChain(clerk);
    expectInvalid(await post(clerk, '/api/ranches', { name: '' }), 'name');
    expectInvalid(await post(clerk, '/api/ranches', { name: 'Ok Ranch', contactEmails: ['not-an-address'] }), /^contactEmails/);
    expectInvalid(await patch(clerk, `/api/ranches/${ranch.id}`, { name: 5 }), 'name');
    expectInvalid(await post(clerk, '/api/fields', { ranchId: ranch.id, name: 'Low Field', areaHa: -1 }), 'areaHa');
    expectInvalid(await post(clerk, '/api/fields', { name: 'Low Field', areaHa: 1 }), 'ranchId');
    expectInvalid(await patch(clerk, `/api/fields/${field.id}`, { areaHa: 'big' }), 'areaHa');
    expectInvalid(await post(clerk, '/api/plantings', { fieldId: field.id, season: '2027-28', crop: 'kale', seededOn: '2027-10-01' }), 'crop');
    expectInvalid(await post(clerk, '/api/plantings', { fieldId: field.id, season: '2027', crop: 'oats', seededOn: '2027-10-01' }), 'season');
    expectInvalid(await patch(clerk, `/api/plantings/${planting.id}`, { seededOn: '2026-13-40' }), 'seededOn');
    expectInvalid(await patch(clerk, `/api/plantings/${planting.id}`, { seedingRateKgHa: 0 }), 'seedingRateKgHa');
  });

  it('answers unknown query values with 400 invalid naming the parameter', async () => {
    const clerk = await as('clerk@crowntip.test');
    expectInvalid(await clerk.agent.get('/api/ranches?limit=9999'), 'limit');
    expectInvalid(await clerk.agent.get('/api/ranches?limit=0'), 'limit');
    expectInvalid(await clerk.agent.get('/api/ranches?offset=-1'), 'offset');
    expectInvalid(await clerk.agent.get('/api/ranches?sort=password'), 'sort');
    expectInvalid(await clerk.agent.get('/api/ranches?dir=sideways'), 'dir');
    expectInvalid(await clerk.agent.get('/api/ranches?season=2026-28'), 'season');
    expectInvalid(await clerk.agent.get('/api/ranches/some-id?season=winter'), 'season');
    expectInvalid(await clerk.agent.get('/api/fields?limit=abc'), 'limit');
    expectInvalid(await clerk.agent.get('/api/fields?ranchId=a&ranchId=b'), 'ranchId');
    expectInvalid(await clerk.agent.get('/api/plantings?crop=kale'), 'crop');
    expectInvalid(await clerk.agent.get('/api/plantings?season=2026'), 'season');
    expectInvalid(await clerk.agent.get('/api/history?entityType=user'), 'entityType');
    expectInvalid(await clerk.agent.get('/api/history?from=yesterday'), 'from');
    // An empty value means "not given", as forms send it.
    expect((await clerk.agent.get('/api/ranches?q=&season=&sort=&limit=')).status).toBe(200);
    // Both spellings of a sort key work.
    expect((await clerk.agent.get('/api/ranches?sort=totalAreaHa&dir=desc')).status).toBe(200);
    expect((await clerk.agent.get('/api/ranches?sort=total_area_ha')).status).toBe(200);
  });

  it('never answers bad input with a 500', async () => {
    const clerk = await as('clerk@crowntip.test');
    const { ranch, field, planting } = await makeChain(clerk);
    const tries = [
      await post(clerk, '/api/ranches', [1, 2, 3]),
      await post(clerk, '/api/ranches', { name: 'x'.repeat(5000) }),
      await clerk.agent.post('/api/ranches').set('X-CSRF-Token', clerk.csrf).set('Content-Type', 'application/json').send('{"name":'),
      await post(clerk, '/api/fields', { ranchId: ranch.id, name: 'F', areaHa: 1, boundary: 'square' }),
      await post(clerk, '/api/fields', { ranchId: ranch.id, name: 'F', areaHa: 1, boundary: { type: 'Polygon', coordinates: [[[0, 0]]] } }),
      await post(clerk, '/api/fields', { ranchId: { $ne: null }, name: 'F', areaHa: 1 }),
      await patch(clerk, `/api/fields/${field.id}`, { ranchId: 'no-such-ranch' }),
      await patch(clerk, `/api/plantings/${planting.id}`, { fieldId: 'no-such-field' }),
      await patch(clerk, `/api/plantings/${planting.id}`, { season: null }),
      await clerk.agent.get('/api/ranches?offset=1e300'),
      await clerk.agent.get(`/api/ranches/${'z'.repeat(3000)}`),
    ];
    for (const res of tries) {
      expect(res.status, JSON.stringify(res.body)).toBeGreaterThanOrEqual(400);
      expect(res.status, JSON.stringify(res.body)).toBeLessThan(500);
      expect(JSON.stringify(res.body)).not.toMatch(/at .*\.ts|sqlite/i);
    }
    // Search text with LIKE and quote characters is only text.
    const odd = await clerk.agent.get('/api/ranches?q=%25%27%22_');
    expect(odd.status).toBe(200);
  });
});

describe('organisation scoping', () => {
  it('answers another organisation’s ids with 404 and changes nothing', async () => {
    const clerk = await as('clerk@crowntip.test');
    const { ranch, field, planting } = await makeChain(clerk);
    const other = await as('admin@quillwater.test');

    for (const path of [`/api/ranches/${ranch.id}`, `/api/fields/${field.id}`, `/api/plantings/${planting.id}`]) {
      const get = await other.agent.get(path);
      expect(get.status, path).toBe(404);
      expect(get.body.error.code).toBe('not_found');
      const change = await patch(other, path, { name: 'Taken Over', areaHa: 99, crop: 'oats' });
      expect(change.status, path).toBe(404);
      expect(change.body.error.code).toBe('not_found');
    }
    const emptied = await post(clerk, '/api/ranches', { name: 'Hazelmere Ranch' });
    expect((await del(other, `/api/ranches/${emptied.body.id}`)).status).toBe(404);
    expect((await del(other, `/api/ranches/${ranch.id}`)).status).toBe(404);

    // Nor can it hang its own records on ours, or see ours in its lists and history.
    expectInvalid(await post(other, '/api/fields', { ranchId: ranch.id, name: 'Stray', areaHa: 1 }), 'ranchId');
    expectInvalid(await post(other, '/api/plantings', { fieldId: field.id, season: '2027-28', crop: 'oats', seededOn: '2027-10-01' }), 'fieldId');
    expect((await other.agent.get(`/api/fields?ranchId=${ranch.id}`)).body).toEqual({ items: [], total: 0 });
    expect((await other.agent.get(`/api/plantings?fieldId=${field.id}`)).body).toEqual({ items: [], total: 0 });
    const otherRanches = (await other.agent.get('/api/ranches?limit=500')).body.items.map((r: { id: string }) => r.id);
    expect(otherRanches).not.toContain(ranch.id);
    expect((await other.agent.get(`/api/history?entityId=${ranch.id}`)).body.total).toBe(0);

    expect((await clerk.agent.get(`/api/ranches/${ranch.id}`)).body.name).toBe('Thistlecombe Ranch');
    expect((await clerk.agent.get(`/api/ranches/${emptied.body.id}`)).status).toBe(200);
    expect((await clerk.agent.get(`/api/fields/${field.id}`)).body).toMatchObject({ name: 'North Bench', areaHa: 4.5 });
    expect((await clerk.agent.get(`/api/plantings/${planting.id}`)).body.crop).toBe('cereal_rye');
    expect((await historyOf(clerk, ranch.id)).total).toBe(1);
  });
});

describe('paging and sorting', () => {
  it('pages ranches with limit and offset; total counts them all', async () => {
    const clerk = await as('clerk@crowntip.test');
    const before = (await clerk.agent.get('/api/ranches')).body.total as number;
    for (let i = 1; i <= 7; i++) await makeRanch(clerk, `Pagewood Ranch ${i}`);

    const page = await clerk.agent.get('/api/ranches?limit=3&offset=3');
    expect(page.status).toBe(200);
    expect(page.body.items).toHaveLength(3);
    expect(page.body.total).toBe(before + 7);

    const ours = await clerk.agent.get('/api/ranches?q=pagewood&limit=3&offset=3');
    expect(ours.body.total).toBe(7);
    expect(ours.body.items.map((r: { name: string }) => r.name)).toEqual(['Pagewood Ranch 4', 'Pagewood Ranch 5', 'Pagewood Ranch 6']);
    const last = await clerk.agent.get('/api/ranches?q=pagewood&limit=3&offset=6&dir=desc');
    expect(last.body.items.map((r: { name: string }) => r.name)).toEqual(['Pagewood Ranch 1']);
    // The default page is 50.
    for (let i = 8; i <= 52; i++) await makeRanch(clerk, `Pagewood Ranch ${String(i).padStart(2, '0')}`);
    const all = await clerk.agent.get('/api/ranches?q=pagewood');
    expect(all.body.items).toHaveLength(50);
    expect(all.body.total).toBe(52);
  });

  it('sorts ranches by a total, in either spelling of the key', async () => {
    const clerk = await as('clerk@crowntip.test');
    const small = await makeRanch(clerk, 'Sortby Small Ranch');
    const large = await makeRanch(clerk, 'Sortby Large Ranch');
    await makeField(clerk, small.id, 'Only Field', { areaHa: 1 });
    await makeField(clerk, large.id, 'Only Field', { areaHa: 30 });
    const names = async (query: string) =>
      (await clerk.agent.get(`/api/ranches?q=sortby&${query}`)).body.items.map((r: { name: string }) => r.name);
    expect(await names('sort=totalAreaHa&dir=desc')).toEqual(['Sortby Large Ranch', 'Sortby Small Ranch']);
    expect(await names('sort=total_area_ha&dir=asc')).toEqual(['Sortby Small Ranch', 'Sortby Large Ranch']);
    expect(await names('sort=name')).toEqual(['Sortby Large Ranch', 'Sortby Small Ranch']);
  });
});

describe('happy path', () => {
  it('creates a ranch, a field with a boundary and a planting, reads them back and totals the ranch', async () => {
    const clerk = await as('clerk@crowntip.test');
    const ranchRes = await post(clerk, '/api/ranches', {
      name: 'Thistlecombe Ranch',
      code: 'TC-1',
      county: 'Ambergate',
      notes: 'Invented for the tests.',
      contactEmails: ['grower@thistlecombe.test'],
    });
    expect(ranchRes.status).toBe(201);
    expect(ranchRes.body).toMatchObject({
      id: expect.any(String),
      name: 'Thistlecombe Ranch',
      code: 'TC-1',
      county: 'Ambergate',
      contactEmails: ['grower@thistlecombe.test'],
      fieldCount: 0,
      totalAreaHa: 0,
      coverCroppedAreaHa: 0,
      coverCroppedSeason: seasonOfDate(todayIso()),
    });
    const ranchId = ranchRes.body.id as string;

    const fieldRes = await post(clerk, '/api/fields', { ranchId, name: 'Creek Square', areaHa: 1, boundary: SQUARE, notes: 'By the creek.' });
    expect(fieldRes.status).toBe(201);
    expect(fieldRes.body).toMatchObject({ ranchId, ranchName: 'Thistlecombe Ranch', name: 'Creek Square', areaHa: 1, boundary: SQUARE });
    expect(Math.abs(fieldRes.body.boundaryAreaHa - SQUARE_HA_BY_HAND) / SQUARE_HA_BY_HAND).toBeLessThan(0.02);
    const fieldId = fieldRes.body.id as string;

    const plantingRes = await post(clerk, '/api/plantings', {
      fieldId,
      season: '2026-27',
      crop: 'triticale',
      variety: 'Invented Early',
      seededOn: '2026-10-15',
      plannedTerminationOn: '2027-03-20',
      seedingRateKgHa: 110,
    });
    expect(plantingRes.status).toBe(201);
    expect(plantingRes.body).toMatchObject({
      fieldId,
      fieldName: 'Creek Square',
      ranchId,
      ranchName: 'Thistlecombe Ranch',
      season: '2026-27',
      crop: 'triticale',
      variety: 'Invented Early',
      seededOn: '2026-10-15',
      plannedTerminationOn: '2027-03-20',
      terminatedOn: null,
      seedingRateKgHa: 110,
    });
    const plantingId = plantingRes.body.id as string;

    expect((await clerk.agent.get(`/api/fields/${fieldId}`)).body).toEqual(fieldRes.body);
    expect((await clerk.agent.get(`/api/plantings/${plantingId}`)).body).toEqual(plantingRes.body);
    expect((await clerk.agent.get(`/api/fields?ranchId=${ranchId}`)).body).toMatchObject({ total: 1, items: [{ id: fieldId }] });
    expect((await clerk.agent.get(`/api/fields?ranchId=${ranchId}&q=creek`)).body.total).toBe(1);
    expect((await clerk.agent.get(`/api/fields?ranchId=${ranchId}&q=nothing`)).body.total).toBe(0);
    expect((await clerk.agent.get(`/api/plantings?ranchId=${ranchId}&season=2026-27&crop=triticale`)).body.total).toBe(1);
    expect((await clerk.agent.get(`/api/plantings?fieldId=${fieldId}&season=2025-26`)).body.total).toBe(0);
    expect((await clerk.agent.get(`/api/plantings?fieldId=${fieldId}&crop=oats`)).body.total).toBe(0);

    // Totals count the planted area of the season asked for.
    const inSeason = (await clerk.agent.get(`/api/ranches/${ranchId}?season=2026-27`)).body;
    expect(inSeason).toMatchObject({ fieldCount: 1, totalAreaHa: 1, coverCroppedAreaHa: 1, coverCroppedSeason: '2026-27' });
    const otherSeason = (await clerk.agent.get(`/api/ranches/${ranchId}?season=2025-26`)).body;
    expect(otherSeason).toMatchObject({ fieldCount: 1, coverCroppedAreaHa: 0, coverCroppedSeason: '2025-26' });
    const listed = (await clerk.agent.get('/api/ranches?q=thistlecombe&season=2026-27')).body;
    expect(listed).toMatchObject({ total: 1, items: [{ id: ranchId, coverCroppedAreaHa: 1 }] });

    // Partial updates keep what was not sent.
    const ranchPatch = await patch(clerk, `/api/ranches/${ranchId}`, { county: 'Brackenford' });
    expect(ranchPatch.status).toBe(200);
    expect(ranchPatch.body).toMatchObject({ name: 'Thistlecombe Ranch', code: 'TC-1', county: 'Brackenford' });
    const fieldPatch = await patch(clerk, `/api/fields/${fieldId}`, { boundary: null, areaHa: 1.2 });
    expect(fieldPatch.status).toBe(200);
    expect(fieldPatch.body).toMatchObject({ name: 'Creek Square', areaHa: 1.2, boundary: null, boundaryAreaHa: null });
    const plantingPatch = await patch(clerk, `/api/plantings/${plantingId}`, { terminatedOn: '2027-03-25' });
    expect(plantingPatch.status).toBe(200);
    expect(plantingPatch.body).toMatchObject({ crop: 'triticale', seededOn: '2026-10-15', terminatedOn: '2027-03-25' });

    const crops = (await clerk.agent.get('/api/crops')).body;
    expect(crops.total).toBe(crops.items.length);
    expect(crops.items.map((c: { code: string }) => c.code)).toEqual(['cereal_rye', 'triticale', 'barley', 'oats', 'wheat', 'legume', 'mix', 'other']);
    expect(crops.items[0]).toEqual({ code: 'cereal_rye', label: 'Cereal rye', cropClass: 'cereal' });
  });

  it('deletes an empty ranch (204, then 404) and refuses a ranch with fields (409)', async () => {
    const clerk = await as('clerk@crowntip.test');
    const { ranch } = await makeChain(clerk);
    const busy = await del(clerk, `/api/ranches/${ranch.id}`);
    expect(busy.status).toBe(409);
    expect(busy.body.error.code).toBe('conflict');
    expect((await clerk.agent.get(`/api/ranches/${ranch.id}`)).status).toBe(200);

    const empty = await makeRanch(clerk, 'Bittern Marsh Ranch');
    expect((await del(clerk, `/api/ranches/${empty.id}`)).status).toBe(204);
    expect((await clerk.agent.get(`/api/ranches/${empty.id}`)).status).toBe(404);
    expect((await del(clerk, `/api/ranches/${empty.id}`)).status).toBe(404);
  });
});

describe('registry rules', () => {
  it('refuses duplicate names with 400 on name, ignoring case', async () => {
    const clerk = await as('clerk@crowntip.test');
    const { ranch, field } = await makeChain(clerk);
    expectInvalid(await post(clerk, '/api/ranches', { name: 'thistlecombe ranch' }), 'name');
    const second = await makeRanch(clerk, 'Quarry Lane Ranch');
    expectInvalid(await patch(clerk, `/api/ranches/${second.id}`, { name: 'Thistlecombe Ranch' }), 'name');
    expectInvalid(await post(clerk, '/api/fields', { ranchId: ranch.id, name: 'north bench', areaHa: 2 }), 'name');
    const other = await makeField(clerk, ranch.id, 'Windbreak Strip');
    expectInvalid(await patch(clerk, `/api/fields/${other.id}`, { name: field.name }), 'name');
    // The same field name on another ranch is fine.
    await makeField(clerk, second.id, 'North Bench');
  });

  it('refuses a second planting of a field in one season with 400 on season', async () => {
    const clerk = await as('clerk@crowntip.test');
    const { field, planting } = await makeChain(clerk);
    expectInvalid(await post(clerk, '/api/plantings', { fieldId: field.id, season: '2026-27', crop: 'oats', seededOn: '2026-11-01' }), 'season');
    const next = await makePlanting(clerk, field.id, { season: '2027-28', seededOn: '2027-10-20' });
    expectInvalid(await patch(clerk, `/api/plantings/${next.id}`, { season: '2026-27' }), 'season');
    expect((await clerk.agent.get(`/api/plantings/${planting.id}`)).body.season).toBe('2026-27');
  });

  it('refuses termination before seeding with 400 on terminatedOn', async () => {
    const clerk = await as('clerk@crowntip.test');
    const { field, planting } = await makeChain(clerk);
    expectInvalid(
      await post(clerk, '/api/plantings', { fieldId: field.id, season: '2027-28', crop: 'oats', seededOn: '2027-11-01', terminatedOn: '2027-10-01' }),
      'terminatedOn',
    );
    // Against the stored seeding date too, when only the termination is sent.
    expectInvalid(await patch(clerk, `/api/plantings/${planting.id}`, { terminatedOn: '2026-09-01' }), 'terminatedOn');
    expectInvalid(await patch(clerk, `/api/plantings/${planting.id}`, { plannedTerminationOn: '2026-09-01' }), 'plannedTerminationOn');
  });

  it('refuses invalid GeoJSON with 400 on the boundary', async () => {
    const clerk = await as('clerk@crowntip.test');
    const { ranch, field } = await makeChain(clerk);
    const open = { type: 'Polygon', coordinates: [SQUARE_RING.slice(0, 4).concat([[-134.9995, 36.0]])] };
    const farNorth = { type: 'Polygon', coordinates: [SQUARE_RING.map(([lon, lat]) => [lon, lat + 164])] };
    const point = { type: 'Point', coordinates: [10, 36] };
    for (const boundary of [open, farNorth, point]) {
      expectInvalid(await post(clerk, '/api/fields', { ranchId: ranch.id, name: 'Bad Shape', areaHa: 1, boundary }), /^boundary/);
      expectInvalid(await patch(clerk, `/api/fields/${field.id}`, { boundary }), /^boundary/);
    }
    expect((await clerk.agent.get(`/api/fields?ranchId=${ranch.id}`)).body.total).toBe(1);
  });
});

describe('change history', () => {
  it('records every create, update and delete with before and after', async () => {
    const clerk = await as('clerk@crowntip.test');
    const { ranch, field, planting } = await makeChain(clerk);
    await patch(clerk, `/api/ranches/${ranch.id}`, { code: 'TC-9' });
    await patch(clerk, `/api/fields/${field.id}`, { areaHa: 5 });
    await patch(clerk, `/api/plantings/${planting.id}`, { variety: 'Invented Late' });

    const ranchHistory = await historyOf(clerk, ranch.id);
    expect(ranchHistory.total).toBe(2);
    // Newest first.
    expect(ranchHistory.items[0]).toMatchObject({ entityType: 'ranch', action: 'update', before: { code: null }, after: { code: 'TC-9' } });
    expect(ranchHistory.items[1]).toMatchObject({ action: 'create', before: null, after: { name: 'Thistlecombe Ranch' } });

    const fieldHistory = await historyOf(clerk, field.id);
    expect(fieldHistory.items.map((e: { action: string }) => e.action)).toEqual(['update', 'create']);
    expect(fieldHistory.items[0]).toMatchObject({ entityType: 'field', before: { areaHa: 4.5 }, after: { areaHa: 5 } });

    const plantingHistory = await historyOf(clerk, planting.id);
    expect(plantingHistory.items.map((e: { action: string }) => e.action)).toEqual(['update', 'create']);
    expect(plantingHistory.items[0]).toMatchObject({ entityType: 'planting', before: { variety: null }, after: { variety: 'Invented Late' } });
    expect(plantingHistory.items[1]).toMatchObject({ userId: clerk.user.id, userName: clerk.user.name });

    const empty = await makeRanch(clerk, 'Cinderfell Ranch');
    expect((await del(clerk, `/api/ranches/${empty.id}`)).status).toBe(204);
    const deleted = await historyOf(clerk, empty.id);
    expect(deleted.items.map((e: { action: string }) => e.action)).toEqual(['delete', 'create']);
    expect(deleted.items[0]).toMatchObject({ before: { name: 'Cinderfell Ranch' }, after: null });

    // Filters and paging of the history itself.
    const creates = (await clerk.agent.get('/api/history?action=create&entityType=field')).body;
    expect(creates.items.some((e: { entityId: string }) => e.entityId === field.id)).toBe(true);
    expect(creates.items.every((e: { action: string; entityType: string }) => e.action === 'create' && e.entityType === 'field')).toBe(true);
    const one = (await clerk.agent.get(`/api/history?entityId=${ranch.id}&limit=1&offset=1`)).body;
    expect(one).toMatchObject({ total: 2, items: [{ action: 'create' }] });
  });

  it('writes no entry for a refused change', async () => {
    const clerk = await as('clerk@crowntip.test');
    const { ranch } = await makeChain(clerk);
    await del(clerk, `/api/ranches/${ranch.id}`); // 409: it has a field
    await patch(clerk, `/api/ranches/${ranch.id}`, { name: '' }); // 400
    expect((await historyOf(clerk, ranch.id)).total).toBe(1);
  });
});
