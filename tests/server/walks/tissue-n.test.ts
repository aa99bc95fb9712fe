import { describe, expect, it } from 'vitest';
import request from 'supertest';
import { parse } from 'csv-parse/sync';
import { extractText, getDocumentProxy } from 'unpdf';
import { csrfFromHtml, signInApi, signInPages, type TestApp } from '../../helpers/app';
import { OTHER_ORG, YEAR, estimateSnapshot, insertField, insertPlanting, insertRanch, insertWalk, freshScenarioForEachTest, type HandWorkedScenario } from '../../helpers/register-scenario';

/*
 * The lab's tissue N % of a walk and one walk read the same everywhere.
 *
 * Hand-worked (exact factors: 1 lb = 0.45359237 kg, 1 ac = 0.40468564224 ha, so 1 kg/ha =
 * 0.8921791216 lb/ac). Threshold 4,500 lb/ac = 5,043.8302 kg/ha. A North's walk of 2025-03-05 is
 * set to 5,043.5 kg/ha (interval ×0.8 and ×1.2: 4,034.8–6,052.2 kg/ha), verdict below:
 *   biomass 5,043.5 × 0.8921791216 = 4,499.705 lb/ac: whole pounds would print "4,500" beside
 *   "Below the 4,500 lb/ac threshold", so every output prints one decimal: "4,499.7 lb/ac".
 *   tissue N 2.5 %: 5,043.5 × 0.025 = 126.0875 kg N/ha = 112.49 lb N/ac → "112 lb N/ac";
 *   interval 4,034.8 × 0.025 = 100.87 kg N/ha = 89.994 → "90"; 6,052.2 × 0.025 = 151.305 = 134.99 → "135".
 */
let t: TestApp;
let s: HandWorkedScenario;
freshScenarioForEachTest((app, scenario) => {
  t = app;
  s = scenario;
});

const put = (agent: ReturnType<typeof request.agent>, csrf: string, walkId: string, body: unknown) =>
  agent.put(`/api/walks/${walkId}/tissue-n`).set('X-CSRF-Token', csrf).send(body as object);

describe('PUT /api/walks/:id/tissue-n', () => {
  it('401 signed out, 403 to samplers and auditors, 400 outside 0 < % ≤ 10, 404 across organisations; any status; logged', async () => {
    expect((await request(t.app).put(`/api/walks/${s.walks.aUsed}/tissue-n`).send({ percent: 2 })).status).toBe(401);
    for (const who of ['sampler2@crowntip.test', 'auditor@crowntip.test']) {
      const u = await signInApi(t.app, who);
      expect((await put(u.agent, u.csrf, s.walks.aUsed, { percent: 2 })).status).toBe(403);
    }
    const { agent, csrf } = await signInApi(t.app, 'clerk@crowntip.test');
    for (const bad of [{ percent: 0 }, { percent: -1 }, { percent: 10.5 }, { percent: 'lots' }, {}]) {
      const res = await put(agent, csrf, s.walks.aUsed, bad);
      expect(res.status).toBe(400);
      expect(res.body.error.code).toBe('invalid');
      expect(res.body.error.fields.percent).toMatch(/above 0 and at most 10/);
    }
    // Another organisation's walk: 404, and nothing written.
    const otherRanch = await insertRanch(t.db, 'Elsewhere', [], OTHER_ORG as never);
    const otherField = await insertField(t.db, otherRanch, 'X', 5, OTHER_ORG as never);
    const otherPlanting = await insertPlanting(t.db, otherField, { crop: 'cereal_rye', seededOn: '2024-10-15' }, OTHER_ORG as never);
    const otherWalk = await insertWalk(t.db, otherPlanting, '2025-03-01', 6000, 'approved', OTHER_ORG as never);
    expect((await put(agent, csrf, otherWalk, { percent: 2 })).status).toBe(404);
    expect(await t.db('walk_tissue_n_log').count({ n: '*' }).first()).toMatchObject({ n: 0 });

    // Allowed on a submitted walk too: it never changes the verdict or the status.
    const submitted = (await t.db('field_walks').where({ status: 'submitted' }).first()).id as string;
    const before = await t.db('field_walks').where({ id: submitted }).first();
    const ok = await put(agent, csrf, submitted, { percent: 10 });
    expect(ok.status).toBe(200);
    expect(ok.body.percent).toBe(10);
    const after = await t.db('field_walks').where({ id: submitted }).first();
    expect(after.status).toBe(before.status);
    expect(after.estimate).toBe(before.estimate);

    const cleared = await put(agent, csrf, submitted, { percent: null });
    expect(cleared.body.percent).toBeNull();
    expect(cleared.body.log.map((l: { percent: number | null; previousPercent: number | null; setByName: string }) => [l.previousPercent, l.percent])).toEqual([
      [10, null],
      [null, 10],
    ]);
    expect(cleared.body.log[0].setByName).toBeTruthy();
  });

  it('the walk page form says what is wrong beside the field', async () => {
    const pages = await signInPages(t.app, 'clerk@crowntip.test');
    const page = await pages.get(`/walks/${s.walks.aUsed}`);
    const res = await pages.post(`/walks/${s.walks.aUsed}/tissue-n`).type('form').send({ _csrf: csrfFromHtml(page.text), tissueN: '12' });
    expect(res.status).toBe(400);
    expect(res.text).toMatch(/id="tissueN-error">Enter the lab’s tissue nitrogen as a percentage above 0 and at most 10/);
    expect(res.text).toContain('value="12"');
    const auditor = await signInPages(t.app, 'auditor@crowntip.test');
    expect((await auditor.get(`/walks/${s.walks.aUsed}`)).text).not.toContain('Save tissue N');
  });
});

describe('one walk, the same verdict word and rounded biomass everywhere', () => {
  it('walk page, register page, PDF and CSV agree, with N in the shoots and its caution', async () => {
    const snap = { ...estimateSnapshot(5043.5), verdict: 'below', decisionBasis: 'point_with_borderline', ruleVersionId: 'rule-v2-test', combinedInterval: null };
    await t.db('field_walks').where({ id: s.walks.aUsed }).update({ estimate: JSON.stringify(snap) });
    const pages = await signInPages(t.app, 'clerk@crowntip.test');
    const walkPage = await pages.get(`/walks/${s.walks.aUsed}`);
    const set = await pages.post(`/walks/${s.walks.aUsed}/tissue-n`).type('form').send({ _csrf: csrfFromHtml(walkPage.text), tissueN: '2.5' });
    expect(set.status).toBe(303);

    const walk = (await pages.get(`/walks/${s.walks.aUsed}`)).text;
    expect(walk).toContain('data-walk-biomass>4,499.7 lb/ac<');
    expect(walk).toContain('data-walk-verdict="below">Below<');
    expect(walk).toContain('data-shoot-n>112 lb N/ac (90–135)<');
    expect(walk).toContain('data-shoot-n-caution');

    const reg = (await pages.get(`/registers/${s.ranchId}/${YEAR}`)).text;
    const row = reg.slice(reg.indexOf('>A North<'), reg.indexOf('>B Legume<'));
    expect(row).toContain('data-walk-biomass>4,499.7 lb/ac<');
    expect(row).toContain('data-walk-verdict="below"');
    expect(row).toContain('>Below<');
    expect(row).toContain('data-shoot-n>112 lb N/ac (90–135)<');
    expect(reg).toContain('data-shoot-n-caution');

    const { agent, csrf } = await signInApi(t.app, 'clerk@crowntip.test');
    const v1 = await agent.post('/api/registers').set('X-CSRF-Token', csrf).send({ ranchId: s.ranchId, year: YEAR });
    const csv: Record<string, string>[] = parse((await agent.get(`/api/registers/${v1.body.id}.csv`)).text.replace(/^\uFEFF/, ''), { columns: true });
    expect(csv.find((r) => r.field === 'A North')).toMatchObject({
      biomass_shown: '4,499.7 lb/ac',
      verdict: 'below',
      decision_basis: 'point_with_borderline',
      rule_version: 'rule-v2-test',
      tissue_n_percent: '2.5',
      shoot_n_kg_ha: '126.1',
      shoot_n_shown: '112 lb N/ac (90–135)',
    });

    const pdfRes = await agent.get(`/api/registers/${v1.body.id}.pdf`).buffer(true).parse((r, cb) => {
      const chunks: Buffer[] = [];
      r.on('data', (c: Buffer) => chunks.push(c));
      r.on('end', () => cb(null, Buffer.concat(chunks)));
    });
    const { text } = await extractText(await getDocumentProxy(new Uint8Array(pdfRes.body as Buffer)), { mergePages: true });
    const pdfRow = text.slice(text.indexOf('A North'), text.indexOf('B Legume'));
    expect(pdfRow).toContain('4,499.7 lb/ac');
    expect(pdfRow).toContain('Below');
    expect(pdfRow).toContain('112 (90–135)');
    expect(text).toContain('Nitrogen in the shoots is an estimate');
  });
});
