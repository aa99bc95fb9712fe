import { readFileSync } from 'node:fs';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import request from 'supertest';
import { createTestApp, csrfFromHtml, signInPages, type TestApp, locationOf } from '../../helpers/app';
import { at, only } from '../../helpers/lists';
import { CM_PER_IN, compareModels, fitCalibration, inToCm, lbPerAcToKgPerHa, lengthForBiomass, type Fit } from '../../../shared/calc';
import { currentCreditRule } from '../../../server/rules/service';
import { demoCalibrationId } from '../../../seeds/03_demo_calibrations';
import { DEMO_ORGANISATIONS } from '../../../seeds/demo-people';
import { readDemo } from '../../shared/demo-data';

const RYE = demoCalibrationId('c', '1', 0);
const TRITICALE = demoCalibrationId('c', '2', 0);
const BARLEY_DRAFT = demoCalibrationId('c', '3', 0);
const OTHER_ORG_RYE = demoCalibrationId('c', '1', 1);
const ORG1 = DEMO_ORGANISATIONS[0].id;
const FIXTURES = 'tests/fixtures/calibration';

const EMAILS = { admin: 'admin@crowntip.test', clerk: 'clerk@crowntip.test', sampler: 'sampler@crowntip.test', auditor: 'auditor@crowntip.test' } as const;
type Role = keyof typeof EMAILS;

let t: TestApp;
beforeEach(async () => {
  t = await createTestApp();
});
afterEach(async () => {
  await t.close();
});

const unescape = (s: string) => s.replace(/&#39;/g, "'").replace(/&#34;|&quot;/g, '"').replace(/&lt;/g, '<').replace(/&gt;/g, '>').replace(/&amp;/g, '&');

/** Signed-in page agent plus a CSRF token taken from one of its pages. */
async function pagesAs(role: Role) {
  const agent = await signInPages(t.app, EMAILS[role]);
  const csrf = csrfFromHtml((await agent.get('/account')).text);
  return { agent, csrf };
}

describe('role matrix of the calibration pages', () => {
  const GETS: { path: string; admin: number; clerk: number; sampler: number; auditor: number }[] = [
    { path: '/calibrations', admin: 200, clerk: 200, sampler: 200, auditor: 200 },
    { path: '/calibrations/new', admin: 200, clerk: 403, sampler: 403, auditor: 403 },
    { path: '/calibrations/template.csv', admin: 200, clerk: 403, sampler: 403, auditor: 403 },
    { path: '/calibrations/assignments', admin: 200, clerk: 200, sampler: 200, auditor: 200 },
    { path: `/calibrations/${RYE}`, admin: 200, clerk: 200, sampler: 200, auditor: 200 },
    { path: `/calibrations/${RYE}/table`, admin: 200, clerk: 200, sampler: 200, auditor: 200 },
    { path: `/calibrations/${RYE}/points.csv`, admin: 200, clerk: 200, sampler: 200, auditor: 200 },
    { path: `/calibrations/${BARLEY_DRAFT}`, admin: 200, clerk: 404, sampler: 404, auditor: 404 },
    { path: `/calibrations/${BARLEY_DRAFT}/table`, admin: 200, clerk: 404, sampler: 404, auditor: 404 },
    { path: `/calibrations/${OTHER_ORG_RYE}`, admin: 404, clerk: 404, sampler: 404, auditor: 404 },
    { path: `/calibrations/${OTHER_ORG_RYE}/table`, admin: 404, clerk: 404, sampler: 404, auditor: 404 },
    { path: `/calibrations/${OTHER_ORG_RYE}/points.csv`, admin: 404, clerk: 404, sampler: 404, auditor: 404 },
  ];

  for (const role of Object.keys(EMAILS) as Role[]) {
    it(`${role}: every page answers as expected`, async () => {
      const agent = await signInPages(t.app, EMAILS[role]);
      for (const row of GETS) {
        const res = await agent.get(row.path);
        expect(res.status, `${role} GET ${row.path}`).toBe(row[role]);
        if (res.status === 403) expect(res.text).toContain('Not allowed');
      }
    });
  }

  it('signed out: pages go to sign in, forms are refused', async () => {
    for (const row of GETS) {
      const res = await request(t.app).get(row.path);
      expect(res.status, row.path).toBe(302);
      expect(res.headers.location).toBe(`/login?next=${encodeURIComponent(row.path)}`);
    }
    expect((await request(t.app).post(`/calibrations/${RYE}/retire`).type('form').send({})).status).toBe(403);
  });

  it('only an admin’s forms change anything: 403 for the other roles', async () => {
    const posts: [string, Record<string, string>][] = [
      [`/calibrations/${BARLEY_DRAFT}/publish`, { model: 'power', label: 'x' }],
      [`/calibrations/${TRITICALE}/retire`, {}],
      [`/calibrations/${BARLEY_DRAFT}/delete`, {}],
      [`/calibrations/${RYE}/drafts`, {}],
      ['/calibrations/assignments', { crop: 'triticale', calibrationId: TRITICALE }],
      ['/calibrations/assignments/remove', { crop: 'triticale' }],
    ];
    for (const role of ['clerk', 'sampler', 'auditor'] as const) {
      const { agent, csrf } = await pagesAs(role);
      for (const [path, body] of posts) {
        const res = await agent.post(path).type('form').send({ _csrf: csrf, ...body });
        expect(res.status, `${role} POST ${path}`).toBe(403);
      }
      const upload = await agent.post('/calibrations/uploads').field('_csrf', csrf).attach('file', `${FIXTURES}/g-m2-semicolon.csv`);
      expect(upload.status, `${role} upload`).toBe(403);
    }
    const calibrations = await t.db('calibrations').where('organisation_id', ORG1).orderBy('id').select('id', 'status', 'updated_at');
    expect(calibrations.map((c) => c.status)).toEqual(['published', 'published', 'draft']);
  });

  it('the navigation shows Calibrations to every role; management links only to admins', async () => {
    for (const role of Object.keys(EMAILS) as Role[]) {
      const agent = await signInPages(t.app, EMAILS[role]);
      const page = await agent.get('/calibrations');
      expect(page.text, role).toMatch(/<a href="\/calibrations" class="nav-link nav-link-active" aria-current="page">Calibrations<\/a>/);
      expect(page.text.includes('href="/calibrations/new"'), role).toBe(role === 'admin');
      expect(page.text.includes('Draft</span>'), role).toBe(role === 'admin');
    }
  });
});

describe('upload, preview and save', () => {
  it('an inch and lb/ac file is previewed with its units, then saved converted to cm and kg/ha', async () => {
    const { agent, csrf } = await pagesAs('admin');
    const up = await agent.post('/calibrations/uploads').field('_csrf', csrf).attach('file', `${FIXTURES}/rye-inches-lbac.csv`);
    expect(up.status).toBe(303);
    const previewUrl = up.headers.location as string;
    expect(previewUrl).toMatch(/^\/calibrations\/uploads\/[0-9a-f-]{36}$/);
    expect(await t.db('calibration_datasets').where('organisation_id', ORG1).count({ n: '*' }).first()).toMatchObject({ n: 3 });

    const preview = await agent.get(previewUrl);
    expect(preview.status).toBe(200);
    expect(preview.text).toContain('All 150 rows are good');
    expect(preview.text).toMatch(/<option value="in" selected>/);
    expect(preview.text).toMatch(/<option value="lb_ac" selected>/);
    expect(preview.text).toContain('The header suggests in.');
    expect(preview.text).toMatch(/<svg [^>]*role="img"/);

    const save = await agent
      .post(previewUrl)
      .type('form')
      .send({ _csrf: csrfFromHtml(preview.text), action: 'save', crop: 'cereal_rye', variety: 'Trial', region: '', name: 'Rye trials', lengthUnit: 'in', biomassUnit: 'lb_ac' });
    expect(save.status).toBe(303);
    const id = (save.headers.location as string).split('/').pop()!;
    const row = await t.db('calibrations').where({ id }).first();
    expect(row).toMatchObject({ status: 'draft', crop: 'cereal_rye', variety: 'Trial', region: '', n: 150 });
    const dataset = await t.db('calibration_datasets').where({ id: row.dataset_id }).first();
    expect(dataset).toMatchObject({ name: 'Rye trials', file_name: 'rye-inches-lbac.csv', length_unit: 'in', biomass_unit: 'lb_ac', row_count: 150 });
    const points = JSON.parse(dataset.points);
    expect(points[0].x).toBe(inToCm(24.02));
    expect(points[0].y).toBe(lbPerAcToKgPerHa(3168));
    const page = await agent.get(`/calibrations/${id}`);
    expect(page.text.includes('150 points saved as a draft calibration for Cereal rye')).toBe(true);
    // The upload is gone once saved.
    expect((await agent.get(previewUrl)).status).toBe(404);
  });

  it('g/m² in a semicolon file is stored ×10 as kg/ha', async () => {
    const { agent, csrf } = await pagesAs('admin');
    const up = await agent.post('/calibrations/uploads').field('_csrf', csrf).attach('file', `${FIXTURES}/g-m2-semicolon.csv`);
    const preview = await agent.get(locationOf(up));
    const save = await agent
      .post(locationOf(up))
      .type('form')
      .send({ _csrf: csrfFromHtml(preview.text), action: 'save', crop: 'oats', name: 'Oats g/m²', lengthUnit: 'cm', biomassUnit: 'g_m2' });
    expect(save.status).toBe(303);
    const c = await t.db('calibrations').where({ id: locationOf(save).split('/').pop() }).first();
    const points = JSON.parse((await t.db('calibration_datasets').where({ id: c.dataset_id }).first()).points);
    expect(points.map((p: { x: number; y: number }) => [p.x, p.y])).toEqual([
      [30.5, 1200],
      [45, 2105],
      [60, 3300],
      [75, 4700],
      [90, 6100],
    ]);
  });

  it('a file with bad rows lists each one and saves nothing (400)', async () => {
    const { agent, csrf } = await pagesAs('admin');
    const up = await agent.post('/calibrations/uploads').field('_csrf', csrf).attach('file', `${FIXTURES}/bad-rows.csv`);
    const preview = await agent.get(locationOf(up));
    expect(preview.text).toContain('5 problems in the rows');
    for (const line of [3, 4, 5, 6, 7]) expect(preview.text).toContain(`Line ${line}:`);
    const before = await t.db('calibrations').count({ n: '*' }).first();
    const save = await agent
      .post(locationOf(up))
      .type('form')
      .send({ _csrf: csrfFromHtml(preview.text), action: 'save', crop: 'barley', name: 'Bad', lengthUnit: 'cm', biomassUnit: 'kg_ha' });
    expect(save.status).toBe(400);
    expect(save.text).toContain('Nothing was saved');
    expect(await t.db('calibrations').count({ n: '*' }).first()).toEqual(before);
  });

  it('form errors show beside their inputs; "check again" re-reads with other units', async () => {
    const { agent, csrf } = await pagesAs('admin');
    const up = await agent.post('/calibrations/uploads').field('_csrf', csrf).attach('file', Buffer.from('length,biomass\n40,1500\n50,2000\n60,2500\n70,3200\n'), 'plain.csv');
    const preview = await agent.get(locationOf(up));
    expect(preview.text).toContain('Choose the unit of the “length” column');
    const token = csrfFromHtml(preview.text);
    const save = await agent.post(locationOf(up)).type('form').send({ _csrf: token, action: 'save', crop: '', name: '' });
    expect(save.status).toBe(400);
    for (const id of ['crop-error', 'name-error', 'lengthUnit-error', 'biomassUnit-error']) expect(save.text).toContain(`id="${id}"`);
    const check = await agent.post(locationOf(up)).type('form').send({ _csrf: token, action: 'check', lengthUnit: 'in', biomassUnit: 'lb_ac' });
    expect(check.status).toBe(200);
    expect(check.text).toContain('All 4 rows are good');
    expect(check.text).toContain(`${(40).toFixed(1)} in`);
  });

  it('refuses a missing, non-UTF-8 or too large file on the form; answers JSON to the upload script', async () => {
    const { agent, csrf } = await pagesAs('admin');
    const none = await agent.post('/calibrations/uploads').field('_csrf', csrf);
    expect(none.status).toBe(400);
    expect(none.text).toContain('Choose a CSV file');
    const latin1 = await agent.post('/calibrations/uploads').field('_csrf', csrf).attach('file', Buffer.from([0x6c, 0x65, 0x6e, 0x67, 0x74, 0x68, 0x0a, 0xe9, 0x0a]), 'latin1.csv');
    expect(latin1.status).toBe(400);
    expect(latin1.text).toContain('not UTF-8');
    const big = await agent.post('/calibrations/uploads').field('_csrf', csrf).attach('file', Buffer.alloc(2 * 1024 * 1024 + 10, 'a'), 'big.csv');
    expect(big.status).toBe(400);
    expect(big.text).toContain('larger than 2 MB');

    const json = await agent.post('/calibrations/uploads').set('Accept', 'application/json').set('X-CSRF-Token', csrf).attach('file', `${FIXTURES}/g-m2-semicolon.csv`);
    expect(json.status).toBe(200);
    expect(json.body.previewUrl).toMatch(/^\/calibrations\/uploads\/[0-9a-f-]{36}$/);
    const jsonError = await agent.post('/calibrations/uploads').set('Accept', 'application/json').set('X-CSRF-Token', csrf).attach('file', Buffer.from([0xff, 0xfe, 0x61, 0x00]), 'u16.csv');
    expect(jsonError.status).toBe(400);
    expect(jsonError.body.error.message).toMatch(/UTF-16/);
    // Without the token nothing is stored.
    const noToken = await agent.post('/calibrations/uploads').attach('file', `${FIXTURES}/g-m2-semicolon.csv`);
    expect(noToken.status).toBe(403);
  });

  it('another organisation cannot open or save an upload', async () => {
    const { agent, csrf } = await pagesAs('admin');
    const up = await agent.post('/calibrations/uploads').field('_csrf', csrf).attach('file', `${FIXTURES}/g-m2-semicolon.csv`);
    const other = await signInPages(t.app, 'admin@quillwater.test');
    expect((await other.get(locationOf(up))).status).toBe(404);
    const token = csrfFromHtml((await other.get('/account')).text);
    expect((await other.post(locationOf(up)).type('form').send({ _csrf: token, action: 'save' })).status).toBe(404);
  });
});

/** The comparison table's numbers, as the page carries them in data attributes. */
function tableNumbers(html: string) {
  const rows = [...html.matchAll(/<tr data-model="(\w+)"[\s\S]*?<\/tr>/g)];
  return rows.map(([row, model]) => ({
    model,
    coefficients: [...row.matchAll(/data-coefficient="\w+" data-value="([^"]+)" data-se="([^"]+)"/g)].map((m) => [Number(m[1]), Number(m[2])]),
    rSquared: Number(row.match(/data-stat="rSquared" data-value="([^"]+)"/)![1]),
    residualStdError: Number(row.match(/data-stat="residualStdError" data-value="([^"]+)"/)![1]),
    looRmse: Number(row.match(/data-stat="looRmse" data-value="([^"]+)"/)![1]),
  }));
}

describe('the fit page', () => {
  it('shows exactly the core’s compareModels numbers, ranked, with its recommendation', async () => {
    const agent = await signInPages(t.app, 'admin@crowntip.test');
    for (const [id, name] of [[RYE, 'cereal-rye'], [BARLEY_DRAFT, 'barley']] as const) {
      const page = await agent.get(`/calibrations/${id}`);
      const cmp = compareModels(readDemo(name).rows.map(({ x, y }) => ({ x, y })));
      const shown = tableNumbers(page.text);
      expect(shown.map((r) => r.model)).toEqual(cmp.ranked.map((r) => r.model));
      for (const [i, r] of cmp.ranked.entries()) {
        const row = at(shown, i, 'table row');
        expect(row.rSquared).toBe(r.fit.rSquared);
        expect(row.residualStdError).toBe(r.fit.residualStdError);
        expect(row.looRmse).toBe(r.fit.looRmse);
        expect(row.coefficients).toEqual(r.fit.coefficients.map((c, k) => [c, r.fit.standardErrors[k]]));
      }
      expect(unescape(page.text)).toContain(cmp.recommendation.message);
    }
  });

  it('charts: two accessible SVGs with the band, the threshold and where the curve reaches it, in the user’s units', async () => {
    const agent = await signInPages(t.app, 'clerk@crowntip.test');
    const page = await agent.get(`/calibrations/${RYE}`);
    const svgs = page.text.match(/<svg [^>]*role="img"[^>]*>/g) ?? [];
    expect(svgs).toHaveLength(2);
    expect(page.text).toMatch(/<title id="[^"]+">Cereal rye, power \(log–log\): biomass against mean main shoot length<\/title>/);
    expect(page.text).toContain('<polygon');
    expect(page.text).toContain('Mean main shoot length (in)');
    expect(page.text).toContain('Oven-dry shoot biomass (lb/ac)');
    expect(page.text).toContain('Threshold 4,500 lb/ac');
    const rule = await currentCreditRule(t.db, ORG1);
    const stored = JSON.parse((await t.db('calibrations').where({ id: RYE }).first()).fit) as Fit;
    const at = lengthForBiomass(stored, rule.thresholdKgHa);
    if (!at.ok) throw new Error('the rye demo curve reaches the threshold');
    expect(Number(page.text.match(/data-threshold-length-cm="([^"]+)"/)![1])).toBe(at.x);
    expect(page.text).toContain(`${(at.x / CM_PER_IN).toFixed(1)} in`);
    // The content security policy allows no inline styles.
    expect(page.text).not.toMatch(/\sstyle="/);
    expect(page.text).not.toContain('<style');
    expect(page.text).toContain('Screening estimates');
  });

  it('a metric user sees cm and kg/ha; ?model= charts another model', async () => {
    await t.db('users').where('email', 'auditor@crowntip.test').update({ units: 'metric' });
    const agent = await signInPages(t.app, 'auditor@crowntip.test');
    const page = await agent.get(`/calibrations/${RYE}?model=quadratic`);
    expect(page.text).toContain('Mean main shoot length (cm)');
    expect(page.text).toContain('Oven-dry shoot biomass (kg/ha)');
    expect(page.text).toContain('The quadratic curve');
    expect(page.text).not.toContain('name="model" value=');
  });
});

describe('publishing and retiring through the pages', () => {
  it('publish needs a name; then the draft is version 1 and its form is gone; again → 409', async () => {
    const { agent, csrf } = await pagesAs('admin');
    const missing = await agent.post(`/calibrations/${BARLEY_DRAFT}/publish`).type('form').send({ _csrf: csrf, model: 'power', label: '' });
    expect(missing.status).toBe(400);
    expect(missing.text).toContain('id="label-error"');
    // A confirmation page first (no script needed), carrying the choices; nothing is published yet.
    const ask = await agent.post(`/calibrations/${BARLEY_DRAFT}/publish`).type('form').send({ _csrf: csrf, model: 'quadratic', label: 'Barley 2026', assign: 'yes' });
    expect(ask.status).toBe(200);
    expect(ask.text).toMatch(/<h1[^>]*>Publish the Barley[^<]* calibration\?<\/h1>/);
    expect(ask.text).toContain('never changes afterwards');
    expect(ask.text).toContain('name="model" value="quadratic"');
    expect(ask.text).toContain('name="confirmed" value="yes"');
    expect((await t.db('calibrations').where({ id: BARLEY_DRAFT }).first()).status).toBe('draft');
    const ok = await agent.post(`/calibrations/${BARLEY_DRAFT}/publish`).type('form').send({ _csrf: csrf, model: 'quadratic', label: 'Barley 2026', assign: 'yes', confirmed: 'yes' });
    expect(ok.status).toBe(303);
    const page = await agent.get(`/calibrations/${BARLEY_DRAFT}`);
    expect(page.text).toContain('Published as version 1 (Barley 2026). Barley estimates now use it.');
    expect(page.text).not.toContain('action="/calibrations/' + BARLEY_DRAFT + '/publish"');
    const stored = await t.db('calibrations').where({ id: BARLEY_DRAFT }).first();
    expect(JSON.parse(stored.fit)).toEqual(JSON.parse(JSON.stringify(fitCalibration(readDemo('barley').rows.map(({ x, y }) => ({ x, y })), 'quadratic'))));
    const again = await agent.post(`/calibrations/${BARLEY_DRAFT}/publish`).type('form').send({ _csrf: csrf, model: 'power', label: 'x' });
    expect(again.status).toBe(409);
  });

  it('retire while in use tells why; after choosing another version it retires', async () => {
    const { agent, csrf } = await pagesAs('admin');
    const refused = await agent.post(`/calibrations/${RYE}/retire`).type('form').send({ _csrf: csrf });
    expect(refused.status).toBe(303);
    expect((await agent.get(`/calibrations/${RYE}`)).text).toContain('Estimates for Cereal rye use this version');
    const draft = await agent.post(`/calibrations/${RYE}/drafts`).type('form').send({ _csrf: csrf });
    const draftId = locationOf(draft).split('/').pop();
    await agent.post(`/calibrations/${draftId}/publish`).type('form').send({ _csrf: csrf, model: 'power', label: 'v2', confirmed: 'yes' });
    const set = await agent.post('/calibrations/assignments').type('form').send({ _csrf: csrf, crop: 'cereal_rye', variety: '', calibrationId: draftId });
    expect(set.status).toBe(303);
    expect((await agent.get('/calibrations/assignments')).text).toContain('version 2, v2');
    await agent.post(`/calibrations/${RYE}/retire`).type('form').send({ _csrf: csrf });
    const page = await agent.get(`/calibrations/${RYE}`);
    expect(page.text).toContain('Version 1 retired.');
    expect(page.text).toContain('Retired on');
    // Still readable, table included, by every role.
    const auditor = await signInPages(t.app, 'auditor@crowntip.test');
    expect((await auditor.get(`/calibrations/${RYE}/table`)).text).toContain('RETIRED version');
  });

  it('the assignments form checks its input', async () => {
    const { agent, csrf } = await pagesAs('admin');
    const bad = await agent.post('/calibrations/assignments').type('form').send({ _csrf: csrf, crop: 'triticale', calibrationId: RYE });
    expect(bad.status).toBe(400);
    expect(bad.text).toContain('id="calibrationId-error"');
    const removed = await agent.post('/calibrations/assignments/remove').type('form').send({ _csrf: csrf, crop: 'triticale', variety: '' });
    expect(removed.status).toBe(303);
    expect((await agent.get('/calibrations/assignments')).text).not.toContain(`href="/calibrations/${TRITICALE}"`);
  });
});

describe('the printable lookup table', () => {
  it.each([
    ['in', 1, CM_PER_IN],
    ['cm', 2, 1],
  ] as const)('steps of %s: the highlighted row is the step at or just above lengthForBiomass', async (unit, step, perUnit) => {
    const agent = await signInPages(t.app, 'sampler@crowntip.test');
    const page = await agent.get(`/calibrations/${RYE}/table?unit=${unit}`);
    expect(page.status).toBe(200);
    const threshold = Number(page.text.match(/data-threshold-kg-ha="([^"]+)"/)![1]);
    expect(threshold).toBe((await currentCreditRule(t.db, ORG1)).thresholdKgHa);
    const fit = JSON.parse((await t.db('calibrations').where({ id: RYE }).first()).fit) as Fit;
    const reach = lengthForBiomass(fit, threshold);
    if (!reach.ok) throw new Error('the rye demo curve reaches the threshold');
    const marked = only([...page.text.matchAll(/<tr data-threshold="true"[^>]*data-length="([^"]+)" data-biomass-kg-ha="([^"]+)"/g)], 'highlighted row');
    expect(Number(marked[1])).toBe(Math.ceil(reach.x / perUnit / step - 1e-9) * step);
    expect(Number(marked[2])).toBeGreaterThanOrEqual(threshold);
    // Every row is a whole step; rows outside the data are marked.
    const lengths = [...page.text.matchAll(/data-length="([^"]+)"/g)].map((m) => Number(m[1]));
    for (const [i, l] of lengths.entries()) if (i) expect(l - at(lengths, i - 1)).toBeCloseTo(step, 9);
    const extrapolated = [...page.text.matchAll(/data-extrapolated="true" data-length="([^"]+)"/g)].map((m) => Number(m[1]) * perUnit);
    for (const x of extrapolated) expect(x < fit.xRange[0] || x > fit.xRange[1]).toBe(true);
    // Provenance and caution; printable on two sheets at most (two columns when long).
    expect(page.text).toContain('n = 150');
    expect(page.text).toContain('1, Demo data — not for real credits');
    expect(page.text).toContain('Screening estimates');
    expect(page.text).toContain('data-print');
    expect(lengths.length).toBeLessThanOrEqual(90);
    expect((page.text.match(/data-lookup-table/g) ?? []).length).toBe(2);
    expect(page.text).not.toMatch(/\sstyle="/);
  });

  it('points.csv gives the stored points back as safe CSV', async () => {
    const agent = await signInPages(t.app, 'auditor@crowntip.test');
    const res = await agent.get(`/calibrations/${RYE}/points.csv`);
    expect(res.headers['content-type']).toMatch(/text\/csv/);
    const lines = res.text.replace(/^\uFEFF/, '').trim().split('\r\n');
    expect(lines[0]).toBe('length_cm,biomass_kg_ha,site,date,stage,note');
    expect(lines).toHaveLength(151);
    expect(lines[1]).toBe('61,3551,Demo plot 2,,,demo data (invented)');
    expect(readFileSync('seeds/data/demo-calibration-cereal-rye.csv', 'utf8')).toContain('61.0,3551,Demo plot 2');
  });
});
