import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { createTestApp, csrfFromHtml, signInApi, signInPages, type TestApp } from '../../helpers/app';
import { textProblem } from '../../../shared/schemas/text';

// Input that cannot be true or cannot be shown safely is refused beside its field, in plain words:
// control and bidirectional-override characters and lone surrogates in names (CVE-2021-42574,
// "Trojan Source", for why the overrides matter); seasons and dates outside 2000–2099; outlines that
// cross themselves; a MultiPolygon of 20,000 parts.

let t: TestApp;
beforeEach(async () => {
  t = await createTestApp();
});
afterEach(async () => {
  await t.close();
});

type Client = Awaited<ReturnType<typeof signInApi>>;
const post = (c: Client, path: string, body: object) => c.agent.post(path).set('X-CSRF-Token', c.csrf).send(body);

function expectRefused(res: { status: number; body: { error: { code: string; fields?: Record<string, string> } } }, field: string, words: RegExp) {
  expect(res.status, JSON.stringify(res.body)).toBe(400);
  expect(res.body.error.code).toBe('invalid');
  expect(res.body.error.fields?.[field]).toMatch(words);
}

/** A square of about 100 m by 100 m near an invented spot, counter-clockwise. */
const square = (x = 0, y = 0) => {
  const d = 0.001;
  const [lon, lat] = [-134.9 + x * 0.01, 36.2 + y * 0.01];
  return [[[lon, lat], [lon + d, lat], [lon + d, lat + d], [lon, lat + d], [lon, lat]]];
};

describe('names and text', () => {
  it.each([
    ['a NUL', 'North\u0000 Ranch', /control characters/],
    ['a bell (control)', 'North\u0007Ranch', /control characters/],
    ['a line break', 'North\nRanch', /one line/],
    ['a right-to-left override', 'North \u202Ehcnar', /text-direction/],
    ['a right-to-left isolate', 'North \u2067Ranch\u2069', /text-direction/],
    ['a lone surrogate', 'North \uD83D Ranch', /broken character/],
  ])('a ranch name with %s is refused beside the name', async (_what, name, words) => {
    const clerk = await signInApi(t.app, 'clerk@crowntip.test');
    expectRefused(await post(clerk, '/api/ranches', { name }), 'name', words);
  });

  it('accepts accents, other scripts and whole emoji; notes keep line breaks', async () => {
    const clerk = await signInApi(t.app, 'clerk@crowntip.test');
    const ok = await post(clerk, '/api/ranches', { name: 'Rancho Peñasco 🌾 東', notes: 'Gate code at the pump.\nCall first.' });
    expect(ok.status, JSON.stringify(ok.body)).toBe(201);
    expect(ok.body.name).toBe('Rancho Peñasco 🌾 東');
  });

  it('the shared check keeps line breaks in notes and refuses NUL and direction overrides', async () => {
    // The shared check itself, on the characters the schemas of shared/schemas/walks.ts and rules.ts see.
    expect(textProblem('Soft ground.\nBy the pump.', { multiline: true })).toBeNull();
    expect(textProblem('Soft\u0000ground', { multiline: true })).toMatch(/control characters/);
    expect(textProblem('Z31\u202E', {})).toMatch(/text-direction/);
  });

  it('the office form shows the message beside the name and keeps the page', async () => {
    const pages = await signInPages(t.app, 'clerk@crowntip.test');
    const form = await pages.get('/registry/ranches/new');
    const res = await pages.post('/registry/ranches').type('form').send({ _csrf: csrfFromHtml(form.text), name: 'North \u202Ehcnar' });
    expect(res.status).toBe(400);
    expect(res.text).toMatch(/id="name-error"[^>]*>[^<]*text-direction/);
  });
});

describe('seasons and dates', () => {
  async function aField(clerk: Client) {
    const ranch = await post(clerk, '/api/ranches', { name: 'Limits Ranch' });
    const field = await post(clerk, '/api/fields', { ranchId: ranch.body.id, name: 'F1', areaHa: 4 });
    expect(field.status, JSON.stringify(field.body)).toBe(201);
    return field.body.id as string;
  }

  it.each(['0000-01', '9999-00'])('season %s is refused beside the season', async (season) => {
    const clerk = await signInApi(t.app, 'clerk@crowntip.test');
    const fieldId = await aField(clerk);
    expectRefused(await post(clerk, '/api/plantings', { fieldId, season, crop: 'cereal_rye', seededOn: '2025-10-15' }), 'season', /between 2000-01 and 2098-99/);
  });

  it.each([
    ['seededOn', '9999-12-31'],
    ['seededOn', '1900-01-01'],
    ['terminatedOn', '9999-12-31'],
  ])('%s %s is refused beside the date', async (key, date) => {
    const clerk = await signInApi(t.app, 'clerk@crowntip.test');
    const fieldId = await aField(clerk);
    expectRefused(await post(clerk, '/api/plantings', { fieldId, season: '2025-26', crop: 'cereal_rye', seededOn: '2025-10-15', [key]: date }), key, /between 2000-01-01 and 2099-12-31/);
  });

  it('a walk dated 9999-12-31 is refused beside walkedOn', async () => {
    const sampler = await signInApi(t.app, 'sampler@crowntip.test');
    const res = await post(sampler, '/api/walks', { id: '7d7f1c2e-1111-4a4a-9b9b-000000000001', plantingId: 'any', walkedOn: '9999-12-31', plants: [{ stop: 1, lengthCm: 80 }] });
    expectRefused(res, 'walkedOn', /between 2000-01-01 and 2099-12-31/);
  });
});

describe('boundaries', () => {
  async function ranchId(clerk: Client) {
    return (await post(clerk, '/api/ranches', { name: 'Outline Ranch' })).body.id as string;
  }

  it('a figure-of-eight (self-intersecting) outline is refused beside the boundary', async () => {
    const clerk = await signInApi(t.app, 'clerk@crowntip.test');
    const [lon, lat] = [-134.9, 36.2];
    // Corners in the order (0,0) (1,1) (1,0) (0,1): the edges (0,0)-(1,1) and (1,0)-(0,1) cross at the centre.
    const bowtie = { type: 'Polygon', coordinates: [[[lon, lat], [lon + 0.001, lat + 0.001], [lon + 0.001, lat], [lon, lat + 0.001], [lon, lat]]] };
    expectRefused(await post(clerk, '/api/fields', { ranchId: await ranchId(clerk), name: 'Bowtie', areaHa: 1, boundary: bowtie }), 'boundary', /crosses itself/);
  });

  it('a MultiPolygon of 20,000 parts is refused beside the boundary; a valid two-part one is kept', async () => {
    const clerk = await signInApi(t.app, 'clerk@crowntip.test');
    const rid = await ranchId(clerk);
    // Short coordinates keep the body under the 1 MB JSON limit, so the check itself answers.
    const parts = Array.from({ length: 20_000 }, () => [[[0, 0], [1, 0], [0, 1], [0, 0]]]);
    const many = await post(clerk, '/api/fields', { ranchId: rid, name: 'Shards', areaHa: 1, boundary: { type: 'MultiPolygon', coordinates: parts } });
    expectRefused(many, 'boundary', /20,000 separate parts; at most 50/);
    // Written with field-scale decimals it is over 2 MB, and the body limit refuses it first.
    const wide = Array.from({ length: 20_000 }, (_, i) => square(i % 100, Math.floor(i / 100)));
    const big = await post(clerk, '/api/fields', { ranchId: rid, name: 'Shards', areaHa: 1, boundary: { type: 'MultiPolygon', coordinates: wide } });
    expect(big.status).toBe(413);
    expect(await t.db('fields').where('name', 'Shards')).toEqual([]);

    const two = await post(clerk, '/api/fields', { ranchId: rid, name: 'Two parts', areaHa: 2, boundary: { type: 'MultiPolygon', coordinates: [square(0, 0), square(1, 0)] } });
    expect(two.status, JSON.stringify(two.body)).toBe(201);
  });
});
