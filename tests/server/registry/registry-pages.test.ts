import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import request from 'supertest';
import { createTestApp, csrfFromHtml, signInPages, type TestApp, locationOf } from '../../helpers/app';
import { acToHa } from '../../../shared/calc/units';
import { seasonOfDate, todayIso } from '../../../shared/registry/season';

let t: TestApp;
beforeEach(async () => {
  t = await createTestApp();
});
afterEach(async () => {
  await t.close();
});

type Agent = ReturnType<typeof request.agent>;
async function postForm(agent: Agent, pagePath: string, action: string, body: Record<string, string>) {
  const page = await agent.get(pagePath);
  return agent.post(action).type('form').send({ _csrf: csrfFromHtml(page.text), ...body });
}
const idFrom = (location: string) => location.split('/').pop()!;

/** The new-field form as a browser sends it: multipart, with a boundary file. */
async function postFieldForm(agent: Agent, ranchId: string, fields: { name: string; area: string }, file: { content: string; name: string }) {
  const form = await agent.get(`/registry/fields/new?ranchId=${ranchId}`);
  return agent
    .post('/registry/fields')
    .field('_csrf', csrfFromHtml(form.text))
    .field('ranchId', ranchId)
    .field('name', fields.name)
    .field('area', fields.area)
    .attach('boundaryFile', Buffer.from(file.content), file.name);
}

// A 0.002° × 0.002° square at latitude 36.2°: about 222.6 m × 179.6 m ≈ 4.0 ha
// (1° of latitude ≈ 111.32 km; 1° of longitude ≈ 111.32 km × cos 36.2° ≈ 89.83 km; spherical, from memory).
const SQUARE = {
  type: 'Polygon',
  coordinates: [[[-134.9, 36.2], [-134.898, 36.2], [-134.898, 36.202], [-134.9, 36.202], [-134.9, 36.2]]],
};

describe('demo registry', () => {
  it('loads three ranches with about thirty fields for the first organisation', async () => {
    const ranches = await t.db('ranches').where('organisation_id', '0b7d3f7e-0000-4000-8000-000000000001');
    expect(ranches).toHaveLength(3);
    const fields = await t.db('fields').whereIn('ranch_id', ranches.map((r) => r.id));
    expect(fields.length).toBe(30);
    expect(fields.filter((f) => f.boundary).length).toBeGreaterThanOrEqual(8);
    const crops = new Set((await t.db('plantings').select('crop')).map((p) => p.crop));
    for (const c of ['cereal_rye', 'triticale', 'mix', 'legume']) expect(crops).toContain(c);
  });
});

describe('clerk keeps the registry through the forms', () => {
  it('adds a ranch, a field with a boundary, and a planting, and sees them in the season view', async () => {
    const clerk = await signInPages(t.app, 'clerk@crowntip.test');
    const ranch = await postForm(clerk, '/registry/ranches/new', '/registry/ranches', { name: 'Mallow Creek', code: 'MC', county: 'Example County', contactEmails: 'a@mallow.test, b@mallow.test' });
    expect(ranch.status).toBe(302);
    const ranchId = idFrom(locationOf(ranch));

    const field = await postFieldForm(clerk, ranchId, { name: 'Mallow 1', area: '10' }, {
      content: JSON.stringify({ type: 'Feature', properties: {}, geometry: SQUARE }),
      name: 'mallow-1.geojson',
    });
    expect(field.status).toBe(302);
    const fieldId = idFrom(locationOf(field));
    const stored = await t.db('fields').where('id', fieldId).first();
    expect(stored.area_ha).toBeCloseTo(acToHa(10), 10); // entered in acres, stored in hectares
    expect(stored.boundary_area_ha).toBeGreaterThan(3.9);
    expect(stored.boundary_area_ha).toBeLessThan(4.1);

    const page = await clerk.get(`/registry/fields/${fieldId}`);
    expect(page.text).toContain('<svg');
    // 10 ac = 4.05 ha entered vs about 4.0 ha drawn: within 10 %, no warning.
    expect(page.text).not.toContain('differs from the entered area');

    const season = seasonOfDate(todayIso());
    const planting = await postForm(clerk, `/registry/plantings/new?fieldId=${fieldId}`, '/registry/plantings', {
      fieldId,
      season,
      crop: 'triticale',
      variety: 'Trial T-1',
      seededOn: `${season.slice(0, 4)}-10-15`,
      seedingRate: '100',
    });
    expect(planting.status).toBe(302);
    const seasonView = await clerk.get(`/registry/season?ranchId=${ranchId}`);
    expect(seasonView.text).toContain('Mallow 1');
    expect(seasonView.text).toContain('Triticale');
    const csv = await clerk.get(`/registry/season.csv?ranchId=${ranchId}`);
    expect(csv.headers['content-type']).toContain('text/csv');
    expect(csv.text.split('\n')[1]).toContain('Mallow Creek');

    const history = await clerk.get(`/history?entityId=${fieldId}`);
    expect(history.text).toContain('Field “Mallow 1” created');
  });

  it('warns when the boundary and the entered area differ by more than 10 %', async () => {
    const clerk = await signInPages(t.app, 'clerk@crowntip.test');
    const ranchId = (await t.db('ranches').where('name', 'Sandpiper Bench').first()).id;
    // 20 ac = 8.1 ha entered against about 4.0 ha drawn.
    const res = await postFieldForm(clerk, ranchId, { name: 'Too Big On Paper', area: '20' }, { content: JSON.stringify(SQUARE), name: 'b.geojson' });
    const page = await clerk.get(locationOf(res));
    expect(page.text).toContain('differs from the entered area');
  });

  it('shows errors inline and keeps what was typed', async () => {
    const clerk = await signInPages(t.app, 'clerk@crowntip.test');
    const ranchId = (await t.db('ranches').where('name', 'Sandpiper Bench').first()).id;
    // 'Bench 1' is taken on this ranch; the area is not a number; the ring is open.
    const res = await postFieldForm(clerk, ranchId, { name: 'Bench 1', area: 'twelve' }, {
      content: '{"type":"Polygon","coordinates":[[[0,0],[1,0],[1,1]]]}',
      name: 'bad.geojson',
    });
    expect(res.status).toBe(400);
    expect(res.text).toContain('value="twelve"');
    expect(res.text).toMatch(/id="area-error"/);
    expect(res.text).toMatch(/id="boundaryFile-error"/);

    const planting = await postForm(clerk, '/registry/ranches', '/registry/ranches', { name: '' });
    expect(planting.status).toBe(400);
    expect(planting.text).toContain('Give the ranch a name.');
  });

  it('refuses to delete a ranch that still has fields', async () => {
    const clerk = await signInPages(t.app, 'clerk@crowntip.test');
    const ranch = await t.db('ranches').where('name', 'Sandpiper Bench').first();
    const res = await postForm(clerk, `/registry/ranches/${ranch.id}`, `/registry/ranches/${ranch.id}/delete`, {});
    expect(res.status).toBe(409);
    expect(await t.db('ranches').where('id', ranch.id).first()).toBeTruthy();
  });
});

describe('read-only roles', () => {
  it('auditor and sampler read registry pages without edit controls; writes are refused', async () => {
    const ranch = await t.db('ranches').where('name', 'Sandpiper Bench').first();
    const field = await t.db('fields').where({ ranch_id: ranch.id, name: 'Bench 1' }).first();
    for (const email of ['auditor@crowntip.test', 'sampler@crowntip.test']) {
      const agent = await signInPages(t.app, email);
      for (const path of ['/registry/ranches', `/registry/ranches/${ranch.id}`, `/registry/fields/${field.id}`, '/registry/season']) {
        const res = await agent.get(path);
        expect(res.status, `${email} ${path}`).toBe(200);
        expect(res.text).not.toMatch(/New ranch|Add field|Edit ranch|Add planting|Edit field/);
      }
      expect((await agent.get('/registry/ranches/new')).status).toBe(403);
      const page = await agent.get('/registry/ranches');
      const res = await agent.post('/registry/ranches').type('form').send({ _csrf: csrfFromHtml(page.text), name: 'Sneaky' });
      expect(res.status).toBe(403);
    }
    const auditor = await signInPages(t.app, 'auditor@crowntip.test');
    expect((await auditor.get('/history')).status).toBe(200);
    const sampler = await signInPages(t.app, 'sampler@crowntip.test');
    expect((await sampler.get('/history')).status).toBe(403);
  });

  it('another organisation’s records answer 404', async () => {
    const ranch = await t.db('ranches').where('name', 'Sandpiper Bench').first();
    const other = await signInPages(t.app, 'clerk@quillwater.test');
    expect((await other.get(`/registry/ranches/${ranch.id}`)).status).toBe(404);
    expect((await other.get('/registry/ranches')).text).not.toContain('Sandpiper Bench');
    expect((await other.get('/registry/season')).text).not.toContain('Sandpiper Bench');
  });
});
