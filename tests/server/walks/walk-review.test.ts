import { randomUUID } from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import request from 'supertest';
import { createTestApp, csrfFromHtml, signInApi, signInPages, type TestApp } from '../../helpers/app';
import { seasonOfDate, todayIso } from '../../../shared/registry/season';
import { duePlantings } from '../../../server/walks/db';
import { dotPlotSvg, mapSketchSvg, walksCsv } from '../../../server/walks/output';
import { DEMO_WALK_IDS } from '../../../seeds/04_demo_walks';
import { DEMO_ORGANISATIONS, DEMO_USERS } from '../../../seeds/demo-people';
import { at } from '../../helpers/lists';
import { xy } from '../../helpers/boundary-files';

// Walk review pages (README, "Walk review"). Each test gets a fresh in-memory database with the
// demo scenario: organisation 1 has one submitted and one approved walk by sampler2@crowntip.test.
// The walks these tests add are invented.

const ORG1 = DEMO_ORGANISATIONS[0].id;
const userId = (email: string) => DEMO_USERS.find((u) => u.email === email)!.id;
const SUBMITTED = DEMO_WALK_IDS.submitted;
const APPROVED = DEMO_WALK_IDS.approved;
/** A real 1 × 1 PNG. */
const TINY_PNG = Buffer.from('iVBORw0KGgoAAAANSUhEUgAAAAEAAAABCAIAAACQd1PeAAAADElEQVR4nGPwqtEDAAIIAPXOsRDEAAAAAElFTkSuQmCC', 'base64');

let t: TestApp;
let uploads: string;
beforeEach(async () => {
  uploads = fs.mkdtempSync(path.join(os.tmpdir(), 'crowntip-walk-review-'));
  t = await createTestApp({ UPLOADS_DIR: uploads });
});
afterEach(async () => {
  await t.close();
  fs.rmSync(uploads, { recursive: true, force: true });
});

type Pages = Awaited<ReturnType<typeof signInPages>>;
const pages = (email: string) => signInPages(t.app, email);
/** Posts an office form with the token of the page it comes from. */
async function postForm(agent: Pages, from: string, action: string, fields: Record<string, string> = {}) {
  const page = await agent.get(from);
  return agent.post(action).type('form').send({ _csrf: csrfFromHtml(page.text), ...fields });
}
const statusOf = async (id: string) => (await t.db('field_walks').where({ id }).first('status', 'reject_reason')) as { status: string; reject_reason: string | null };
/** The walk ids listed in the queue, in order. */
const listed = (html: string) => [...html.matchAll(/<tr data-walk="([^"]+)"/g)].map((m) => m[1]);

async function duePlanting(crop: string, withBoundary = false) {
  const due = (await duePlantings(t.db, ORG1, { season: seasonOfDate(todayIso()), today: todayIso() })).filter(
    (p) => p.crop === crop && (!withBoundary || p.boundary),
  );
  if (!due[0]) throw new Error(`no due ${crop} planting${withBoundary ? ' with a boundary' : ''} in the demo registry`);
  return due[0];
}

/** A walk posted through the JSON API by a sampler (and submitted unless told otherwise). */
async function postWalk(
  plantingId: string,
  lengths: number[],
  opts: { gps?: (i: number) => { lat: number; lon: number } | null; submit?: boolean; photoStop?: number; email?: string } = {},
) {
  const api = await signInApi(t.app, opts.email ?? 'sampler@crowntip.test');
  const id = randomUUID();
  const plants = lengths.map((lengthCm, i) => ({ stop: i + 1, lengthCm, ...(opts.gps?.(i) ?? {}) }));
  const res = await api.agent.post('/api/walks').set('X-CSRF-Token', api.csrf).send({ id, plantingId, walkedOn: todayIso(), stage: 'Z31', plants });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  if (opts.photoStop) {
    const up = await api.agent.post(`/api/walks/${id}/photos`).set('X-CSRF-Token', api.csrf).field('stop', String(opts.photoStop)).attach('photo', TINY_PNG, 'stop.png');
    expect(up.status, JSON.stringify(up.body)).toBe(201);
  }
  if (opts.submit !== false) expect((await api.agent.post(`/api/walks/${id}/submit`).set('X-CSRF-Token', api.csrf)).status).toBe(200);
  return id;
}

const ORDINARY = [84.5, 77.0, 91.5, 80.0, 73.5, 88.0, 79.0, 86.5, 82.0, 76.5];

describe('who may see walk review', () => {
  it('sends a signed-out visitor to sign in and back', async () => {
    for (const p of ['/walks', `/walks/${SUBMITTED}`, '/walks/export.csv']) {
      const res = await request(t.app).get(p);
      expect(res.status, p).toBe(302);
      expect(res.headers.location).toBe(`/login?next=${encodeURIComponent(p)}`);
    }
  });

  it('gives samplers 403 on every page and form', async () => {
    const agent = await pages('sampler2@crowntip.test'); // the demo walks' own sampler
    for (const p of ['/walks', `/walks/${SUBMITTED}`, '/walks/export.csv?status=all']) {
      const res = await agent.get(p);
      expect(res.status, p).toBe(403);
      expect(res.text).toContain('Not allowed');
    }
    const res = await postForm(agent, '/account', `/walks/${SUBMITTED}/approve`);
    expect(res.status).toBe(403);
    expect((await statusOf(SUBMITTED)).status).toBe('submitted');
  });

  it('lets admins, clerks and auditors read; only clerks and admins act', async () => {
    for (const email of ['admin@crowntip.test', 'clerk@crowntip.test', 'auditor@crowntip.test']) {
      const agent = await pages(email);
      expect((await agent.get('/walks')).status, email).toBe(200);
      expect((await agent.get(`/walks/${SUBMITTED}`)).status, email).toBe(200);
    }
    const auditor = await pages('auditor@crowntip.test');
    expect((await postForm(auditor, '/walks', `/walks/${SUBMITTED}/approve`)).status).toBe(403);
    expect((await postForm(auditor, '/walks', `/walks/${SUBMITTED}/reject`, { reason: 'No.' })).status).toBe(403);
    expect((await statusOf(SUBMITTED)).status).toBe('submitted');
  });

  it('answers 404 for another organisation’s walk and for an unknown id, on pages and forms', async () => {
    const other = await pages('clerk@quillwater.test');
    expect((await other.get(`/walks/${SUBMITTED}`)).status).toBe(404);
    expect((await postForm(other, '/walks', `/walks/${SUBMITTED}/approve`)).status).toBe(404);
    expect((await postForm(other, '/walks', `/walks/${SUBMITTED}/reject`, { reason: 'Not yours.' })).status).toBe(404);
    expect(listed((await other.get('/walks?status=all')).text)).toEqual([]);
    expect((await statusOf(SUBMITTED)).status).toBe('submitted');
    const clerk = await pages('clerk@crowntip.test');
    expect((await clerk.get(`/walks/${randomUUID()}`)).status).toBe(404);
  });

  it('links Walks in the navigation for the office roles only', async () => {
    for (const email of ['admin@crowntip.test', 'clerk@crowntip.test', 'auditor@crowntip.test']) {
      expect((await (await pages(email)).get('/account')).text, email).toContain('href="/walks"');
    }
    expect((await (await pages('sampler@crowntip.test')).get('/account')).text).not.toContain('href="/walks"');
  });
});

describe('the queue', () => {
  it('opens on the review queue for clerks and admins, on approved walks for auditors', async () => {
    const clerk = await (await pages('clerk@crowntip.test')).get('/walks');
    expect(listed(clerk.text)).toEqual([SUBMITTED]);
    expect(clerk.text).toContain('Walks to review');
    expect(clerk.text).toMatch(/To review \(1\)/);
    const admin = await (await pages('admin@crowntip.test')).get('/walks');
    expect(listed(admin.text)).toEqual([SUBMITTED]);
    const auditor = await (await pages('auditor@crowntip.test')).get('/walks');
    expect(listed(auditor.text)).toEqual([APPROVED]);
  });

  it('lists the review queue oldest first and every other tab newest first', async () => {
    // The demo's submitted walk was walked two days ago; this one today.
    const fresh = await postWalk((await duePlanting('cereal_rye')).plantingId, ORDINARY);
    const clerk = await pages('clerk@crowntip.test');
    const queue = (await clerk.get('/walks?status=submitted')).text;
    expect(listed(queue)).toEqual([SUBMITTED, fresh]);
    const all = (await clerk.get('/walks?status=all')).text;
    expect(listed(all).slice(0, 2)).toEqual([fresh, SUBMITTED]);
    // The captions say the order each list really has.
    expect(queue).toMatch(/<caption>[^<]*oldest walk first[^<]*<\/caption>/);
    expect(all).toMatch(/<caption>[^<]*newest walk first[^<]*<\/caption>/);
  });

  it('filters by status, ranch and sampler', async () => {
    const agent = await pages('clerk@crowntip.test');
    expect(listed((await agent.get('/walks?status=approved')).text)).toEqual([APPROVED]);
    expect(listed((await agent.get('/walks?status=all')).text).sort()).toEqual([SUBMITTED, APPROVED].sort());
    const rejected = await agent.get('/walks?status=rejected');
    expect(listed(rejected.text)).toEqual([]);
    expect(rejected.text).toContain('No walks match these filters.');

    // Ranch: the submitted walk's ranch lists it; another ranch does not.
    const ranchOf = async (walkId: string) =>
      (await t.db('field_walks').join('plantings', 'plantings.id', 'field_walks.planting_id').join('fields', 'fields.id', 'plantings.field_id').where('field_walks.id', walkId).first('fields.ranch_id')).ranch_id as string;
    const ranchId = await ranchOf(SUBMITTED);
    const all = listed((await agent.get(`/walks?status=all&ranchId=${ranchId}`)).text);
    expect(all).toContain(SUBMITTED);
    const otherRanch = (await t.db('ranches').where({ organisation_id: ORG1 }).whereNot('id', ranchId).whereNot('id', await ranchOf(APPROVED)).first('id')).id;
    expect(listed((await agent.get(`/walks?status=all&ranchId=${otherRanch}`)).text)).toEqual([]);

    // Sampler: sampler2 made both demo walks; sampler made none.
    expect(listed((await agent.get(`/walks?status=all&samplerId=${userId('sampler2@crowntip.test')}`)).text)).toHaveLength(2);
    expect(listed((await agent.get(`/walks?status=all&samplerId=${userId('sampler@crowntip.test')}`)).text)).toEqual([]);
    // Nonsense filters are ignored rather than failing.
    expect((await agent.get('/walks?status=bogus&page=-3')).status).toBe(200);
  });

  it('shows n, mean length, estimate with interval, verdict and photo count in the reader’s units', async () => {
    const agent = await pages('clerk@crowntip.test');
    const html = (await agent.get('/walks')).text;
    const row = html.slice(html.indexOf(`<tr data-walk="${SUBMITTED}"`));
    const cells = row.slice(0, row.indexOf('</tr>'));
    expect(cells).toContain('Teo Marquenda');
    expect(cells).toContain('32.2 in'); // mean of the demo lengths, 81.85 cm
    expect(cells).toMatch(/[\d,]+ lb\/ac/);
    expect(cells).toMatch(/90 % combined: [\d,]+–[\d,]+ lb\/ac/);
    expect(cells).toMatch(/data-walk-verdict="(meets|below|borderline)">(Meets|Below|Borderline)</);
    expect(cells).toContain('data-walk-verdict="borderline"'); // the demo rye walk: see the flags test below
    expect(cells).not.toContain('✓');

    await t.db('users').where({ id: userId('clerk@crowntip.test') }).update({ units: 'metric' });
    const metric = await (await pages('clerk@crowntip.test')).get('/walks');
    expect(metric.text).toContain('81.9 cm');
    expect(metric.text).toMatch(/[\d,]+ kg\/ha/);
  });

  it('flags outliers, extrapolated estimates, few plants, borderline verdicts and missing calibrations', async () => {
    const rye = await duePlanting('cereal_rye');
    const outlier = await postWalk(rye.plantingId, [...ORDINARY.slice(0, 9), 120]);
    const few = await postWalk(rye.plantingId, [98, 102, 100, 97, 103, 101]);
    const extrapolated = await postWalk(rye.plantingId, ORDINARY.map((x) => x + 160));
    const borderline = await postWalk(rye.plantingId, [60, 95, 70, 88, 75, 82, 65, 92, 78, 80]);
    const noCalibration = await postWalk((await duePlanting('oats')).plantingId, ORDINARY);
    const agent = await pages('clerk@crowntip.test');
    const html = (await agent.get('/walks')).text;
    const flagsOf = (id: string) => {
      const row = html.slice(html.indexOf(`<tr data-walk="${id}"`));
      return [...row.slice(0, row.indexOf('</tr>')).matchAll(/data-flag="([a-z_]+)"/g)].map((m) => m[1]);
    };
    expect(flagsOf(outlier)).toContain('outlier');
    // Six plants under the demo rule's minimum of 10: borderline (too few plants) as well.
    expect(flagsOf(few)).toEqual(['few_plants', 'borderline']);
    expect(flagsOf(extrapolated)).toContain('extrapolated');
    expect(flagsOf(borderline)).toEqual(['borderline']);
    expect(flagsOf(noCalibration)).toEqual(['no_calibration']);
    // The demo rye walk (10 plants, mean 32.2 in) is the example: the calibration's own scatter
    // spans 4,500 lb/ac from about 25 to 39 in, so under the demo rule it is borderline.
    expect(flagsOf(SUBMITTED)).toEqual(['borderline']);

    // The detail page says what each flag means, and marks the odd plant.
    const detail = (await agent.get(`/walks/${outlier}`)).text;
    expect(detail).toMatch(/One plant is far from the others: stop 10 \(47\.2 in\)/);
    expect(detail).toMatch(/<tr data-stop="10">[\s\S]*?outlier[\s\S]*?<\/tr>/);
    expect((await agent.get(`/walks/${borderline}`)).text).toMatch(/spans the 4,500 lb\/ac threshold/);
    const none = (await agent.get(`/walks/${noCalibration}`)).text;
    expect(none).toContain('No estimate: no published calibration was assigned');
    expect(none).toContain('no estimate');
  });
});

describe('a walk’s evidence', () => {
  it('shows the plants with GPS and photo, the dot plot with the threshold length, and the map sketch on the boundary', async () => {
    const field = await duePlanting('cereal_rye', true);
    const boundary = field.boundary!;
    const ring = at(boundary.type === 'Polygon' ? boundary.coordinates : at(boundary.coordinates, 0, 'polygon'), 0, 'outer ring').map(xy);
    const lons = ring.map(([lon]) => lon);
    const lats = ring.map(([, lat]) => lat);
    const [lon0, lon1, lat0, lat1] = [Math.min(...lons), Math.max(...lons), Math.min(...lats), Math.max(...lats)];
    // Along the diagonal, stop 3 without GPS.
    const gps = (i: number) => (i === 2 ? null : { lat: lat0 + ((lat1 - lat0) * (i + 1)) / 11, lon: lon0 + ((lon1 - lon0) * (i + 1)) / 11 });
    const id = await postWalk(field.plantingId, ORDINARY, { gps, photoStop: 4 });
    const agent = await pages('clerk@crowntip.test');
    const html = (await agent.get(`/walks/${id}`)).text;
    // Plants table: GPS to 5 decimals, "—" without, a thumbnail linking to the full photo.
    expect(html).toContain(`${gps(0)!.lat.toFixed(5)}, ${gps(0)!.lon.toFixed(5)}`);
    expect(html).toMatch(/<tr data-stop="3">[\s\S]*?<td class="whitespace-nowrap">—<\/td>/);
    const photo = html.match(/<a href="(\/api\/walks\/[^"]+\/photos\/[^"]+)"[^>]*><img src="\1" alt="Photo of stop 4"/);
    expect(photo).not.toBeNull();
    expect((await agent.get(at(photo ?? [], 1, 'photo link'))).headers['content-type']).toBe('image/png');
    // Dot plot: ten dots, mean and threshold lines.
    const plot = html.slice(html.indexOf('<svg', html.indexOf('The plants')), html.indexOf('</svg>', html.indexOf('The plants')));
    expect(plot.match(/<circle [^>]*><title>Stop/g)).toHaveLength(10);
    expect(plot).toContain('mean 32.2 in');
    expect(plot).toMatch(/needed 30\.\d in/);
    // Map sketch: the outline and the nine stops with GPS, numbered.
    expect(html).toContain('with the 9 stops where GPS was recorded');
    const sketch = html.slice(html.indexOf('aria-labelledby="walk-map-title"'));
    expect(sketch.slice(0, sketch.indexOf('</svg>'))).toMatch(/<path d="M[^"]+Z" fill="#e6efe8"/);
    expect(sketch.match(/<title>Stop \d+/g)).toHaveLength(9);
    expect(sketch).not.toContain('<title>Stop 3:');
    expect(html).toContain('9 of 10 with GPS, on the field’s boundary outline');
    // Estimate block: the verdict's reasons worded from the stored numbers (no stored note), calibration and version.
    expect(html).toContain('data-verdict-reasons');
    expect(html).not.toContain('data-estimate-note');
    expect(html).toMatch(/version 1 <span[^>]*>\(id [^)]+\)/);
  });

  it('without GPS says there is nothing to sketch; without a boundary sketches the stops alone', async () => {
    const agent = await pages('clerk@crowntip.test');
    expect((await agent.get(`/walks/${SUBMITTED}`)).text).toContain('No GPS was recorded at any stop');
    const noBoundary = (await duePlantings(t.db, ORG1, { season: seasonOfDate(todayIso()), today: todayIso() })).find((p) => p.crop === 'cereal_rye' && !p.boundary)!;
    const id = await postWalk(noBoundary.plantingId, ORDINARY.slice(0, 4), { gps: (i) => ({ lat: 36.2 + i * 0.0003, lon: -134.9 + i * 0.0004 }) });
    const html = (await agent.get(`/walks/${id}`)).text;
    expect(html).toContain('No field boundary on record: the stops alone');
    expect(html.match(/<title>Stop \d+: 36\.2/g)).toHaveLength(4);
  });
});

describe('approve and reject through the forms', () => {
  it('approves: the walk counts, a flash says so, and the queue is empty again', async () => {
    const agent = await pages('clerk@crowntip.test');
    const res = await postForm(agent, `/walks/${SUBMITTED}`, `/walks/${SUBMITTED}/approve`);
    expect(res.status).toBe(303);
    expect(res.headers.location).toBe('/walks');
    const row = await t.db('field_walks').where({ id: SUBMITTED }).first();
    expect(row.status).toBe('approved');
    expect(row.reviewed_by).toBe(userId('clerk@crowntip.test'));
    const queue = await agent.get('/walks');
    expect(queue.text).toContain('Walk approved: Spring 7');
    expect(listed(queue.text)).toEqual([]);
    expect(queue.text).toContain('No walks are waiting for review.');
    const detail = (await agent.get(`/walks/${SUBMITTED}`)).text;
    expect(detail).toContain('This walk counts in registers.');
    expect(detail).not.toContain('/approve"');
  });

  it('refuses a reject without a reason inline (400), keeps what was typed, then rejects with one', async () => {
    const agent = await pages('admin@crowntip.test');
    const blank = await postForm(agent, `/walks/${SUBMITTED}`, `/walks/${SUBMITTED}/reject`, { reason: '   ' });
    expect(blank.status).toBe(400);
    expect(blank.text).toMatch(/<p class="field-error" id="reason-error">Say why the walk is rejected.<\/p>/);
    expect(blank.text).toContain('aria-invalid="true"');
    const long = 'Measure the main shoot, not a tiller. '.repeat(30); // over 1000 characters
    const tooLong = await postForm(agent, `/walks/${SUBMITTED}`, `/walks/${SUBMITTED}/reject`, { reason: long });
    expect(tooLong.status).toBe(400);
    expect(tooLong.text).toContain(long.trim());
    expect((await statusOf(SUBMITTED)).status).toBe('submitted');

    const reason = 'Stops 3 to 6 look like tillers. Walk the field again and measure the main shoot.';
    const res = await postForm(agent, `/walks/${SUBMITTED}`, `/walks/${SUBMITTED}/reject`, { reason });
    expect(res.status).toBe(303);
    expect(res.headers.location).toBe('/walks');
    expect(await statusOf(SUBMITTED)).toEqual({ status: 'rejected', reject_reason: reason });
    expect((await agent.get('/walks')).text).toContain('Teo Marquenda sees the reason in the capture app.');
    expect((await agent.get(`/walks/${SUBMITTED}`)).text).toContain(reason);
    // The sampler reads the reason through the API the capture app uses.
    const sampler = await signInApi(t.app, 'sampler2@crowntip.test');
    expect((await sampler.agent.get(`/api/walks/${SUBMITTED}`)).body.rejectReason).toBe(reason);
  });

  it('shows a walk no longer waiting for review as a friendly message, and changes nothing', async () => {
    const agent = await pages('clerk@crowntip.test');
    const res = await postForm(agent, `/walks/${APPROVED}`, `/walks/${APPROVED}/reject`, { reason: 'Too late.' });
    expect(res.status).toBe(303);
    expect(res.headers.location).toBe(`/walks/${APPROVED}`);
    const page = await agent.get(`/walks/${APPROVED}`);
    expect(page.text).toMatch(/This walk is already approved by Jonah Pellbrook on [^,]+, \d{4}, so it cannot be rejected now\. Nothing was changed\./);
    expect((await statusOf(APPROVED)).status).toBe('approved');

    // A draft cannot be reviewed either.
    const draft = await postWalk((await duePlanting('cereal_rye')).plantingId, ORDINARY, { submit: false });
    const approveDraft = await postForm(agent, `/walks/${draft}`, `/walks/${draft}/approve`);
    expect(approveDraft.status).toBe(303);
    expect((await agent.get(`/walks/${draft}`)).text).toContain('still a draft');
    expect((await statusOf(draft)).status).toBe('draft');
  });

  it('needs the page’s CSRF token', async () => {
    const agent = await pages('clerk@crowntip.test');
    expect((await agent.post(`/walks/${SUBMITTED}/approve`).type('form').send({})).status).toBe(403);
    expect((await statusOf(SUBMITTED)).status).toBe('submitted');
  });
});

describe('auditors', () => {
  it('see the evidence without any action controls, with a Print button', async () => {
    const agent = await pages('auditor@crowntip.test');
    for (const id of [SUBMITTED, APPROVED]) {
      const html = (await agent.get(`/walks/${id}`)).text;
      expect(html).not.toContain('/approve"');
      expect(html).not.toContain('/reject"');
      expect(html).not.toContain('name="reason"');
      expect(html).toContain('data-print');
      expect(html).toContain('Estimate');
    }
    // Clerks see the forms only while the walk waits for review.
    const clerk = await pages('clerk@crowntip.test');
    expect((await clerk.get(`/walks/${SUBMITTED}`)).text).toContain(`action="/walks/${SUBMITTED}/approve"`);
    expect((await clerk.get(`/walks/${APPROVED}`)).text).not.toContain('/approve"');
  });

  it('export the filtered walks as CSV, one row per plant, in SI units', async () => {
    const agent = await pages('auditor@crowntip.test');
    const res = await agent.get('/walks/export.csv?status=all');
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toMatch(/^text\/csv/);
    const lines = res.text.replace(/^\uFEFF/, '').trim().split(/\r\n/);
    expect(lines[0]).toMatch(/^walk_id,status,ranch,field,crop,crop_name,variety,sampler,walked_on,stage,stop,length_cm,lat,lon,photo,n,mean_length_cm,biomass_kg_ha/);
    expect(lines).toHaveLength(1 + 20); // two demo walks of ten plants
    expect(lines.filter((l) => l.startsWith(SUBMITTED))[0]).toContain(',84.5,');
    const approvedOnly = (await agent.get('/walks/export.csv')).text.trim().split(/\r\n/);
    expect(approvedOnly).toHaveLength(11);
  });
});

describe('the drawings', () => {
  it('the dot plot stacks coinciding lengths, labels outliers, and escapes text', () => {
    const svg = dotPlotSvg({
      id: 'x',
      title: 'Lengths <test>',
      unit: 'cm',
      plants: [80, 80, 80, 81, 20].map((value, i) => ({ stop: i + 1, value, text: `${value} cm`, outlier: value === 20 })),
      mean: { value: 68.2, text: 'mean 68.2 cm' },
      threshold: null,
    });
    expect(svg).toContain('Lengths &lt;test&gt;');
    const ys = [...svg.matchAll(/<circle cx="[\d.]+" cy="([\d.]+)" r="7" fill="#fff"[^>]*><title>Stop [1-3]:/g)].map((m) => Number(m[1]));
    expect(new Set(ys).size).toBe(3); // three plants at 80 cm in three rows
    expect(svg).toContain('>stop 5</text>');
    expect(svg).not.toContain('needed');
  });

  it('the sketch keeps a stop recorded outside the field in view', () => {
    const boundary = { type: 'Polygon' as const, coordinates: [[[-134.95, 36.25], [-134.947, 36.25], [-134.947, 36.2514], [-134.95, 36.2514], [-134.95, 36.25]]] };
    const svg = mapSketchSvg({ id: 'm', title: 'Sketch', boundary, stops: [{ stop: 1, lat: 36.2507, lon: -134.9485 }, { stop: 2, lat: 36.26, lon: -134.94 }], outliers: new Set([2]), units: 'metric' });
    for (const m of svg.matchAll(/<circle cx="([\d.-]+)" cy="([\d.-]+)"/g)) {
      expect(Number(m[1])).toBeGreaterThanOrEqual(0);
      expect(Number(m[1])).toBeLessThanOrEqual(420);
      expect(Number(m[2])).toBeGreaterThanOrEqual(0);
      expect(Number(m[2])).toBeLessThanOrEqual(300);
    }
    expect(svg).toMatch(/<text [^>]*>\d[\d,]* m<\/text>/); // a scale bar in metres
  });

  it('the CSV guards text cells against spreadsheet formulas', () => {
    const csv = walksCsv([
      {
        id: 'w', plantingId: 'p', fieldId: 'f', fieldName: '=HYPERLINK("x")', ranchName: 'R', crop: 'cereal_rye', variety: null, walkedOn: '2026-11-01',
        stage: null, notes: null, status: 'submitted', rejectReason: null, sampler: { id: 's', name: 'S' }, plants: [{ stop: 1, lengthCm: 80, lat: null, lon: null }],
        photos: [], estimate: null, createdAt: '', submittedAt: null, reviewedAt: null, reviewedBy: null,
      },
    ]);
    expect(csv).toContain(`"'=HYPERLINK(""x"")"`);
    expect(csv).toContain('no_calibration few_plants');
  });
});
