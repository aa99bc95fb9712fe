import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import request from 'supertest';
import { createTestApp, csrfFromHtml, signInPages, type TestApp, locationOf } from '../../helpers/app';
import { kmlOf, kmzOf, shapefileOf, zipOf, WGS84_PRJ, type TwinFeature } from '../../helpers/boundary-files';

let t: TestApp;
beforeEach(async () => {
  t = await createTestApp({ UPLOADS_DIR: mkdtempSync(path.join(tmpdir(), 'crowntip-boundaries-')) });
});
afterEach(async () => {
  await t.close();
});

type Agent = ReturnType<typeof request.agent>;

// Invented boxes in the open Pacific near 36° N, 130° W. A 0.002° square at 36.2° N on turf's sphere
// (R = 6,371,008.8 m, so 1° = 111.195 km): 222.39 m × (222.39 m × cos 36.2° = 179.46 m) = 3.991 ha
// = 9.86 ac (1 ac = 0.404686 ha). Hand-worked; turf's spherical area differs by far less than 0.01 ac.
const box = (name: string, x0: number, y0 = 36.2, size = 0.002): TwinFeature => ({
  name,
  geometry: { type: 'Polygon', coordinates: [[[x0, y0], [x0 + size, y0], [x0 + size, y0 + size], [x0, y0 + size], [x0, y0]]] },
});
const bowtie: TwinFeature = { name: 'Bowtie', geometry: { type: 'Polygon', coordinates: [[[-130, 36], [-129.99, 36.01], [-129.99, 36], [-130, 36.01], [-130, 36]]] } };

const ranchOf = async (name = 'Sandpiper Bench') => (await t.db('ranches').where('name', name).first()).id as string;

async function postFieldForm(agent: Agent, ranchId: string, fields: Record<string, string>, file?: { content: Buffer | string; name: string }) {
  const form = await agent.get(`/registry/fields/new?ranchId=${ranchId}`);
  let req = agent.post('/registry/fields').field('_csrf', csrfFromHtml(form.text)).field('ranchId', ranchId);
  for (const [k, v] of Object.entries(fields)) req = req.field(k, v);
  return file ? req.attach('boundaryFile', Buffer.from(file.content), file.name) : req;
}

describe('field form: boundary from KML, KMZ or a zipped shapefile', () => {
  it('saves the one shape of a KML file as the field’s boundary', async () => {
    const clerk = await signInPages(t.app, 'clerk@crowntip.test');
    const res = await postFieldForm(clerk, await ranchOf(), { name: 'Gull 1', area: '10' }, { content: kmlOf([box('Gull 1', -130)]), name: 'gull.kml' });
    expect(res.status).toBe(302);
    const field = await t.db('fields').where('name', 'Gull 1').first();
    expect(JSON.parse(field.boundary).coordinates[0][0]).toEqual([-130, 36.2]);
    expect(Number(field.boundary_area_ha)).toBeCloseTo(3.991, 2);
  });

  it('lists the shapes of a file with several, by name and area, and saves the one picked', async () => {
    const clerk = await signInPages(t.app, 'clerk@crowntip.test');
    const ranchId = await ranchOf();
    const kmz = await kmzOf([box('North', -130), box('South', -130, 36.1, 0.001), bowtie]);
    const first = await postFieldForm(clerk, ranchId, { name: 'South', area: '2.5' }, { content: kmz, name: 'blocks.kmz' });
    expect(first.status).toBe(200);
    expect(await t.db('fields').where('name', 'South').first()).toBeUndefined();
    expect(first.text).toContain('Which shape is this field?');
    expect(first.text).toMatch(/<strong>North<\/strong> · 9\.86 ac/);
    expect(first.text).toMatch(/value="1" checked/); // "South" preselected by the typed name
    expect(first.text).toMatch(/value="2"\s+disabled/);
    expect(first.text).toMatch(/Cannot be used: The outline crosses itself/);
    const upload = first.text.match(/name="boundaryUpload" value="([a-f0-9]{32})"/)![1];

    // The bowtie cannot be picked: the problem is shown beside the file input.
    const bad = await clerk.post('/registry/fields').type('form').send({ _csrf: csrfFromHtml(first.text), ranchId, name: 'South', area: '2.5', boundaryUpload: upload, boundaryPick: '2' });
    expect(bad.status).toBe(400);
    expect(bad.text).toMatch(/id="boundaryFile-error">Bowtie: The outline crosses itself/);

    const res = await clerk.post('/registry/fields').type('form').send({ _csrf: csrfFromHtml(first.text), ranchId, name: 'South', area: '2.5', boundaryUpload: upload, boundaryPick: '1' });
    expect(res.status).toBe(302);
    const field = await t.db('fields').where('name', 'South').first();
    expect(JSON.parse(field.boundary).coordinates[0][0]).toEqual([-130, 36.1]);
  });

  it('refuses a self-intersecting outline beside the field and keeps what was typed', async () => {
    const clerk = await signInPages(t.app, 'clerk@crowntip.test');
    const { shp, dbf } = shapefileOf([bowtie]);
    const res = await postFieldForm(clerk, await ranchOf(), { name: 'Knot', area: '3' }, { content: await zipOf({ 'k.shp': shp, 'k.dbf': dbf, 'k.prj': WGS84_PRJ }), name: 'knot.zip' });
    expect(res.status).toBe(400);
    expect(res.text).toMatch(/id="boundaryFile-error">The outline crosses itself \(once, first near/);
    expect(res.text).toContain('value="Knot"');
  });

  it('another organisation can use neither the upload id nor the ranch', async () => {
    const clerk = await signInPages(t.app, 'clerk@crowntip.test');
    const ranchId = await ranchOf();
    const first = await postFieldForm(clerk, ranchId, { name: 'X', area: '1' }, { content: kmlOf([box('A', -130), box('B', -129.99)]), name: 'two.kml' });
    const upload = first.text.match(/name="boundaryUpload" value="([a-f0-9]{32})"/)![1];
    const outsider = await signInPages(t.app, 'clerk@quillwater.test');
    const form = await outsider.get('/registry/ranches/new');
    const made = await outsider.post('/registry/ranches').type('form').send({ _csrf: csrfFromHtml(form.text), name: 'Heron Spit' });
    const otherRanch = locationOf(made).split('/').pop();
    expect((await clerk.get(`/registry/ranches/${ranchId}/boundaries/${upload}`)).status).toBe(200);
    expect((await outsider.get(`/registry/ranches/${otherRanch}/boundaries/${upload}`)).status).toBe(404);
    expect((await outsider.get(`/registry/ranches/${ranchId}/boundaries`)).status).toBe(404);
  });
});

describe('many fields from one file', () => {
  const upload = async (agent: Agent, ranchId: string, content: Buffer | string, name: string) => {
    const page = await agent.get(`/registry/ranches/${ranchId}/boundaries`);
    return agent.post(`/registry/ranches/${ranchId}/boundaries`).field('_csrf', csrfFromHtml(page.text)).attach('boundaryFile', Buffer.from(content), name);
  };

  it('previews every shape, then matches existing fields by name and creates the rest, all at once', async () => {
    const clerk = await signInPages(t.app, 'clerk@crowntip.test');
    const ranchId = await ranchOf();
    const existing = (await t.db('fields').where('ranch_id', ranchId).orderBy('name').first()) as { id: string; name: string; area_ha: number };
    const features = [box(existing.name.toUpperCase(), -130), box('Tern 7', -129.99), box('Tern 8', -129.98)];
    const { shp, dbf } = shapefileOf(features);
    const res = await upload(clerk, ranchId, await zipOf({ 'b.shp': shp, 'b.dbf': dbf, 'b.prj': WGS84_PRJ }), 'blocks.zip');
    expect(res.status).toBe(302);
    const preview = await clerk.get(locationOf(res));
    expect(preview.status).toBe(200);
    expect(preview.text).toContain('No problems found: all 3 shapes can be imported.');
    expect(preview.text).toMatch(new RegExp(`(Replaces the boundary of|Adds a boundary to) field “${existing.name}”`));
    expect(preview.text).toContain('New field “Tern 7”, area 9.86 ac from the boundary.');

    const commit = await clerk.post(locationOf(res)).type('form').send({ _csrf: csrfFromHtml(preview.text), name: 'NAME' });
    expect(commit.status).toBe(302);
    const after = await t.db('fields').where('id', existing.id).first();
    expect(JSON.parse(after.boundary).coordinates[0][0]).toEqual([-130, 36.2]);
    expect(Number(after.area_ha)).toBe(Number(existing.area_ha)); // the entered area stays
    const tern = await t.db('fields').where({ ranch_id: ranchId, name: 'Tern 7' }).first();
    expect(Number(tern.area_ha)).toBe(3.99); // to the hundredth of a hectare
    const history = await t.db('change_history').where('entity_id', tern.id);
    expect(history).toHaveLength(1);
    const ranchPage = await clerk.get(`/registry/ranches/${ranchId}`);
    expect(ranchPage.text).toContain('Boundaries imported from blocks.zip: 2 new fields');
  });

  it('writes nothing while any shape has a problem, and says which and why', async () => {
    const clerk = await signInPages(t.app, 'clerk@crowntip.test');
    const ranchId = await ranchOf();
    const before = await t.db('fields').count({ n: '*' }).first();
    const kml = kmlOf([box('Tern 1', -130), box('Tern 1', -129.99), bowtie, box('Tern 3', -129.98)]);
    const res = await upload(clerk, ranchId, kml, 'blocks.kml');
    const preview = await clerk.get(locationOf(res));
    expect(preview.text).toContain('3 shapes have a problem');
    expect(preview.text).toContain('2 shapes in the file are named “Tern 1”; a field takes one boundary.');
    expect(preview.text).toMatch(/The outline crosses itself/);
    expect(preview.text).toMatch(/<button class="btn" type="submit"\s+disabled>Import 4 boundaries/);
    // The names can come from another attribute (here the KML's extended data).
    const byBlock = await clerk.get(`${res.headers.location}?name=block`);
    expect(byBlock.text).toContain('New field “B-Tern 3”');
    const commit = await clerk.post(locationOf(res)).type('form').send({ _csrf: csrfFromHtml(preview.text), name: 'name' });
    expect(commit.status).toBe(400);
    expect(commit.text).toContain('Nothing was imported');
    expect(await t.db('fields').count({ n: '*' }).first()).toEqual(before);
  });

  it('refuses an unreadable file beside the input; only clerks and admins may import', async () => {
    const clerk = await signInPages(t.app, 'clerk@crowntip.test');
    const ranchId = await ranchOf();
    const bad = await upload(clerk, ranchId, 'not a boundary', 'notes.txt');
    expect(bad.status).toBe(400);
    expect(bad.text).toMatch(/id="boundaryFile-error">The boundary file could not be read/);
    for (const email of ['sampler@crowntip.test', 'auditor@crowntip.test']) {
      const agent = await signInPages(t.app, email);
      expect((await agent.get(`/registry/ranches/${ranchId}/boundaries`)).status).toBe(403);
    }
    expect((await clerk.get(`/registry/ranches/${ranchId}/boundaries/${'0'.repeat(32)}`)).status).toBe(404);
  });
});
