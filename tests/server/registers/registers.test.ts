import { createHash } from 'node:crypto';
import { describe, expect, it } from 'vitest';
import request from 'supertest';
import type { Knex } from 'knex';
import { parse } from 'csv-parse/sync';
import { extractText, getDocumentProxy } from 'unpdf';
import { csrfFromHtml, signInApi, signInPages, type TestApp, locationOf } from '../../helpers/app';
import { ORG, OTHER_ORG, YEAR, insertField, insertRanch, freshScenarioForEachTest, type HandWorkedScenario } from '../../helpers/register-scenario';
import { HttpError } from '../../../server/platform/errors';
import { jsonValue } from '../../../server/platform/column-values';
import { computeRegister, finaliseRegister, canonicalJson, seasonOfYear, reportingYearOf } from '../../../server/registers/service';
import { diffRegisters } from '../../../server/registers/diff';
import { keyringOf } from '../../../server/registers/signing';
import { organisationSummary } from '../../../server/registers/summary';
import { at, only } from '../../helpers/lists';

/*
 * Hand-worked register for reporting year 2025 (season 2024-25) of "Hand-Worked Ranch".
 * Rule version 2 (in effect on 1 January 2025): threshold 4,500 lb/ac = 5,043.83 kg/ha, at least
 * 90 days in the window 10-01..03-31, cereals only, credit 50 lb N/ac, walk ≤ 30 days before
 * termination. (Version 3, effective 2025-06-01, has 80 lb N/ac and must not be used.)
 * Exact factors: 1 ac = 0.40468564224 ha; 1 lb = 0.45359237 kg. Credit = 50 lb N/ac × acres.
 * Days in window count seeding day .. the day before termination (shared/calc/dates.ts).
 *
 * A North, 10 ac cereal rye "Ridgeline", seeded 2024-10-15, terminated 2025-03-20.
 *   window days: Oct 15–31 17 + Nov 30 + Dec 31 + Jan 31 + Feb 28 + Mar 1–19 19 = 156 ≥ 90
 *   approved walks 02-01 (47 days before: too early) and 03-05 (15 days: used, 6,000 kg/ha ≥ 5,043.83);
 *   a submitted walk (03-15) and a rejected one (03-16) do not count.
 *   eligible: 50 × 10 = 500 lb N = 500 × 0.45359237 = 226.796185 kg N
 * B Legume, 20 ac legume: 181 window days, walk fine, but the crop is not eligible → 0
 * C Early Walk, 5 ac triticale, seeded 2024-10-10, terminated 2025-04-15: 22+30+31+31+28+31 = 173 days;
 *   the only walk (03-01) is 45 days before termination > 30 → sample_too_early → 0
 * D Boundary, 12.5 ac barley seeded 2024-09-01 (before the window opens), terminated 2025-01-05:
 *   window days only from Oct 1: 31+30+31+4 = 96 ≥ 90; walk 12-20 (16 days), 5,100 kg/ha ≥ 5,043.83
 *   eligible: 50 × 12.5 = 625 lb N = 283.49523125 kg N
 * E Late Seeding, 8 ac oats seeded 2025-01-15, terminated 2025-05-01: 17+28+31 = 76 < 90 → 0
 * "=cmd()", 4 ac wheat (variety "-2+3"): 120 days, no walk → no_estimate → 0
 * G Fallow, 3 ac: no planting → 0
 * H Projected, 6 ac cereal rye seeded 2024-11-01, no termination: projected to min(today, 2025-12-31)
 *   = 2025-12-31: 151 days (Nov–Mar) + 91 (2025-10-01..12-30) = 242; walk 2025-12-20 (11 days) →
 *   on track: 50 × 6 = 300 lb N = 136.077711 kg N, not in the total
 * I Walk After, 2 ac cereal rye, terminated 2025-03-01, only walk 03-05 → sample_after_termination → 0
 *
 * Totals: 9 fields, 8 planted, 2 eligible (A, D); eligible area 22.5 ac = 9.1054269504 ha;
 * total area 70.5 ac = 28.53033777792 ha; credit 1,125 lb N = 510.29141625 kg N.
 */
const TODAY = '2026-12-01';
const AC = 0.40468564224;
const LB = 0.45359237;

let t: TestApp;
let s: HandWorkedScenario;
freshScenarioForEachTest((app, scenario) => {
  t = app;
  s = scenario;
});

const rowOf = (reg: { rows: { fieldName: string }[] }, name: string) => {
  const row = reg.rows.find((r) => r.fieldName === name);
  if (!row) throw new Error(`no row ${name}`);
  return row as never as import('../../../server/registers/service').RegisterRow;
};
const codes = (r: { reasons: { code: string }[] }) => r.reasons.map((x) => x.code);

describe('year and season', () => {
  it('covers the season of the winter that ends in the reporting year', () => {
    expect(seasonOfYear(2027)).toBe('2026-27');
    expect(seasonOfYear(2000)).toBe('1999-00');
    expect(reportingYearOf('2026-12-01')).toBe(2027);
    expect(reportingYearOf('2027-03-31')).toBe(2027);
    expect(reportingYearOf('2027-07-01')).toBe(2028);
  });
});

describe('register rows, worked out by hand', () => {
  it('computes every row, the walk used, the reasons and the totals', async () => {
    const reg = (await computeRegister(t.db, ORG, s.ranchId, YEAR, TODAY))!;
    expect(reg.season).toBe('2024-25');
    expect(reg.rule.version).toBe(2); // in effect on 2025-01-01, not version 3 (2025-06-01)
    expect(reg.rule.creditKgNPerHa).toBeCloseTo((50 * LB) / AC, 10);
    expect(reg.rows.map((r) => r.fieldName)).toEqual(['=cmd()', 'A North', 'B Legume', 'C Early Walk', 'D Boundary', 'E Late Seeding', 'G Fallow', 'H Projected', 'I Walk After']);

    const a = rowOf(reg, 'A North');
    expect(a.daysInWindow).toBe(156);
    expect(a.walk?.id).toBe(s.walks.aUsed); // the latest approved walk within 30 days
    expect(a.walkQualifies).toBe(true);
    expect(a.walk?.biomassKgHa).toBe(6000);
    expect(a.walk?.interval).toEqual([4800, 7200]);
    expect(a.verdict).toBe('eligible');
    expect(a.reasons).toEqual([]);
    expect(a.creditKgN).toBeCloseTo(226.796185, 9); // 500 lb N

    const b = rowOf(reg, 'B Legume');
    expect(b.daysInWindow).toBe(181);
    expect(b.verdict).toBe('not_eligible');
    expect(codes(b)).toEqual(['crop_not_eligible']);
    expect(b.creditKgN).toBe(0);

    const c = rowOf(reg, 'C Early Walk');
    expect(c.daysInWindow).toBe(173);
    expect(c.walk?.id).toBe(s.walks.c); // shown, though it does not qualify
    expect(c.walkQualifies).toBe(false);
    expect(codes(c)).toEqual(['sample_too_early']);
    expect(only(c.reasons).message).toContain('45 days before termination');

    const d = rowOf(reg, 'D Boundary');
    expect(d.daysInWindow).toBe(96); // September does not count: the window opens on Oct 1
    expect(d.verdict).toBe('eligible');
    expect(d.creditKgN).toBeCloseTo(283.49523125, 9); // 625 lb N

    const e = rowOf(reg, 'E Late Seeding');
    expect(e.daysInWindow).toBe(76); // the window closes on Mar 31
    expect(codes(e)).toEqual(['too_few_days_in_window']);

    const f = rowOf(reg, '=cmd()');
    expect(f.daysInWindow).toBe(120);
    expect(codes(f)).toEqual(['no_estimate']);

    const g = rowOf(reg, 'G Fallow');
    expect(g.verdict).toBe('no_planting');
    expect(g.plantingId).toBeNull();
    expect(codes(g)).toEqual(['no_planting']);

    const h = rowOf(reg, 'H Projected');
    expect(h.projected).toBe(true);
    expect(h.endOn).toBe('2025-12-31');
    expect(h.daysInWindow).toBe(242);
    expect(h.verdict).toBe('projected_eligible');
    expect(h.creditKgN).toBeCloseTo(136.077711, 9); // 300 lb N, not counted

    const i = rowOf(reg, 'I Walk After');
    expect(codes(i)).toEqual(['sample_after_termination']);

    expect(reg.totals.fields).toBe(9);
    expect(reg.totals.plantedFields).toBe(8);
    expect(reg.totals.eligibleFields).toBe(2);
    expect(reg.totals.eligibleAreaHa).toBeCloseTo(22.5 * AC, 10); // 9.1054269504 ha
    expect(reg.totals.totalAreaHa).toBeCloseTo(70.5 * AC, 10); // 28.53033777792 ha
    expect(reg.totals.creditKgN).toBeCloseTo(1125 * LB, 9); // 510.29141625 kg N
    expect(reg.totals.projectedFields).toBe(1);
    expect(reg.totals.projectedCreditKgN).toBeCloseTo(300 * LB, 9);

    // Every walk the rows rest on, and the calibration versions of their estimates.
    expect(reg.walkIds).toEqual([s.walks.aUsed, s.walks.b, s.walks.c, s.walks.d, s.walks.e, s.walks.h, s.walks.i].sort());
    expect(reg.walkIds).not.toContain(s.walks.aSubmitted);
    expect(reg.calibrations).toEqual([{ id: 'cal-rye-test', version: 3 }]);
  });

  it('projects to today when today is before the end of the year', async () => {
    const reg = (await computeRegister(t.db, ORG, s.ranchId, YEAR, '2025-03-01'))!;
    const h = rowOf(reg, 'H Projected');
    expect(h.endOn).toBe('2025-03-01');
    expect(h.daysInWindow).toBe(30 + 31 + 31 + 28); // Nov 1 .. Feb 28
    // The only walk (2025-12-20) is after the projection date.
    expect(codes(h)).toEqual(['sample_after_termination']);
  });

  it('is not found for another organisation’s ranch', async () => {
    expect(await computeRegister(t.db, OTHER_ORG, s.ranchId, YEAR, TODAY)).toBeUndefined();
  });
});

describe('finalise, immutability and amendments (API)', () => {
  it('finalises an immutable snapshot with a content hash, refuses changes, and amends with a diff', async () => {
    const { agent, csrf } = await signInApi(t.app, 'clerk@crowntip.test');
    const draft = await agent.get(`/api/registers?ranchId=${s.ranchId}&year=${YEAR}`);
    expect(draft.status).toBe(200);
    expect(draft.body.status).toBe('draft');
    expect(draft.body.totals.creditKgN).toBeCloseTo(1125 * LB, 9);

    const v1 = await agent.post('/api/registers').set('X-CSRF-Token', csrf).send({ ranchId: s.ranchId, year: YEAR });
    expect(v1.status).toBe(201);
    expect(v1.body).toMatchObject({ status: 'final', version: 1, previousId: null, diff: null });
    expect(v1.body.finalisedBy.name).toBe('Jonah Pellbrook');
    expect(v1.body.rule.version).toBe(2);
    expect(v1.body.contentHash).toMatch(/^[0-9a-f]{64}$/);

    // The hash is the SHA-256 of the stored canonical JSON, which holds who and when.
    const stored = await t.db('registers').where('id', v1.body.id).first();
    expect(createHash('sha256').update(stored.snapshot).digest('hex')).toBe(v1.body.contentHash);
    expect(stored.snapshot).toBe(canonicalJson(JSON.parse(stored.snapshot)));
    expect(stored).toMatchObject({ version: 1, rule_version: 2, finalised_by_name: 'Jonah Pellbrook', year: YEAR });
    const shown = await agent.get(`/api/registers/${v1.body.id}`);
    expect(shown.body.hashVerified).toBe(true);

    // Now GET ?ranchId&year answers the finalised snapshot.
    const current = await agent.get(`/api/registers?ranchId=${s.ranchId}&year=${YEAR}`);
    expect(current.body).toMatchObject({ status: 'final', id: v1.body.id, version: 1, contentHash: v1.body.contentHash });

    // Nothing changes a finalised register.
    for (const method of ['patch', 'put', 'delete'] as const) {
      const res = await agent[method](`/api/registers/${v1.body.id}`).set('X-CSRF-Token', csrf).send({ totals: { creditKgN: 1 } });
      expect(res.status, method).toBe(409);
      expect(res.body.error.code).toBe('conflict');
      expect(res.body.error.message).toContain('finalise again to make an amendment');
    }
    expect((await agent.delete('/api/registers/00000000-0000-4000-8000-00000000dead').set('X-CSRF-Token', csrf)).status).toBe(404);
    expect((await t.db('registers').where('id', v1.body.id).first()).snapshot).toBe(stored.snapshot);

    // Finalising again with nothing changed is refused: an amendment needs a change.
    const same = await agent.post('/api/registers').set('X-CSRF-Token', csrf).send({ ranchId: s.ranchId, year: YEAR });
    expect(same.status).toBe(409);
    expect(same.body.error.code).toBe('conflict');

    // A change in the registry: C is terminated earlier, so its walk (03-01) is 24 days before.
    // C: window days Oct 10–31 22 + 30 + 31 + 31 + 28 + Mar 1–24 24 = 166; eligible: 50 × 5 = 250 lb N.
    await t.db('plantings').where('id', s.plantings.c).update({ terminated_on: '2025-03-25' });
    // The finalised version does not move …
    const again = await agent.get(`/api/registers/${v1.body.id}`);
    expect(again.body.contentHash).toBe(v1.body.contentHash);
    expect(again.body.totals.creditKgN).toBeCloseTo(1125 * LB, 9);
    // … while the draft shows the change.
    const draft2 = await agent.get(`/api/registers?ranchId=${s.ranchId}&year=${YEAR}&draft=1`);
    expect(draft2.body.status).toBe('draft');
    expect(draft2.body.totals.creditKgN).toBeCloseTo(1375 * LB, 9); // 623.68950875 kg N

    const v2 = await agent.post('/api/registers').set('X-CSRF-Token', csrf).send({ ranchId: s.ranchId, year: YEAR });
    expect(v2.status).toBe(201);
    expect(v2.body).toMatchObject({ version: 2, previousId: v1.body.id });
    expect(v2.body.contentHash).not.toBe(v1.body.contentHash);
    const diff = v2.body.diff;
    expect(diff.unchanged).toBe(false);
    expect(diff.added).toEqual([]);
    expect(diff.removed).toEqual([]);
    expect(diff.changed).toHaveLength(1);
    expect(diff.changed[0].fieldName).toBe('C Early Walk');
    const change = Object.fromEntries(diff.changed[0].changes.map((c: { key: string; before: unknown; after: unknown }) => [c.key, [c.before, c.after]]));
    expect(change.terminatedOn).toEqual(['2025-04-15', '2025-03-25']);
    expect(change.daysInWindow).toEqual([173, 166]);
    expect(change.verdict).toEqual(['not_eligible', 'eligible']);
    expect(change.creditKgN[0]).toBe(0);
    expect(change.creditKgN[1]).toBeCloseTo(250 * LB, 9); // 113.3980925 kg N
    expect(change.reasons).toEqual(['sample_too_early', null]);
    const totals = Object.fromEntries(diff.totals.map((c: { key: string; before: number; after: number }) => [c.key, [c.before, c.after]]));
    expect(totals.eligibleFields).toEqual([2, 3]);
    expect(totals.eligibleAreaHa[1]).toBeCloseTo(27.5 * AC, 10);
    expect(totals.creditKgN[0]).toBeCloseTo(1125 * LB, 9);
    expect(totals.creditKgN[1]).toBeCloseTo(1375 * LB, 9);
    expect(diff.rule).toBeNull();

    const versions = await agent.get(`/api/registers/versions?ranchId=${s.ranchId}&year=${YEAR}`);
    expect(versions.body.total).toBe(2);
    expect(versions.body.items.map((v: { version: number }) => v.version)).toEqual([2, 1]);
  });

  it('lists added and removed fields and a rule change in a diff', async () => {
    const v1 = (await computeRegister(t.db, ORG, s.ranchId, YEAR, TODAY))!;
    await insertField(t.db, s.ranchId, 'J New', 1);
    await t.db('fields').where('id', s.fields.g).update({ ranch_id: await insertRanch(t.db, 'Elsewhere') });
    const v2 = (await computeRegister(t.db, ORG, s.ranchId, YEAR, TODAY))!;
    const diff = diffRegisters(v1, { ...v2, rule: { ...v2.rule, version: 9 } });
    expect(diff.added.map((a) => a.fieldName)).toEqual(['J New']);
    expect(diff.removed.map((a) => a.fieldName)).toEqual(['G Fallow']);
    expect(diff.rule?.after.version).toBe(9);
    expect(diff.totals.find((c) => c.key === 'totalAreaHa')).toBeTruthy();
    expect(diffRegisters(v1, v1).unchanged).toBe(true);
  });

  it('never makes two versions of the same number when finalisations race', async () => {
    const { agent, csrf } = await signInApi(t.app, 'clerk@crowntip.test');
    const admin = await signInApi(t.app, 'admin@crowntip.test');
    const [x, y] = await Promise.all([
      agent.post('/api/registers').set('X-CSRF-Token', csrf).send({ ranchId: s.ranchId, year: YEAR }),
      admin.agent.post('/api/registers').set('X-CSRF-Token', admin.csrf).send({ ranchId: s.ranchId, year: YEAR }),
    ]);
    expect([x.status, y.status].sort()).toEqual([201, 409]);
    const rows = await t.db('registers').where({ ranch_id: s.ranchId, year: YEAR });
    expect(rows).toHaveLength(1);
    // The unique index is the last line of defence (several servers on one database) …
    const dup = { ...rows[0], id: '00000000-0000-4000-8000-0000000000aa' };
    await expect(t.db('registers').insert(dup)).rejects.toThrow(/UNIQUE|duplicate key/); // SQLite's words, PostgreSQL's
    // … and a violation reaching the service becomes 409 conflict.
    const racing = { transaction: async () => Promise.reject(Object.assign(new Error('UNIQUE constraint failed: registers.organisation_id'), { code: 'SQLITE_CONSTRAINT_UNIQUE' })) };
    const err = await finaliseRegister(racing as unknown as Knex, ORG, s.ranchId, YEAR, { id: 'u', name: 'U' }, TODAY, keyringOf(t.config)).catch((e) => e);
    expect(err).toBeInstanceOf(HttpError);
    expect(err.code).toBe('conflict');
  });
});

describe('CSV and PDF', () => {
  it('writes one row per field and a totals row, with formula-looking cells neutralised', async () => {
    const { agent, csrf } = await signInApi(t.app, 'clerk@crowntip.test');
    const v1 = await agent.post('/api/registers').set('X-CSRF-Token', csrf).send({ ranchId: s.ranchId, year: YEAR });
    const auditor = await signInApi(t.app, 'auditor@crowntip.test');
    const res = await auditor.agent.get(`/api/registers/${v1.body.id}.csv`);
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toContain('text/csv');
    expect(res.headers['content-disposition']).toContain('crowntip-register-hand-worked-ranch-2025-v1.csv');
    const text = res.text.replace(/^\uFEFF/, '');
    const records: Record<string, string>[] = parse(text, { columns: true });
    expect(records).toHaveLength(10); // 9 fields + the totals row
    const injected = records.find((r) => r.field?.includes('cmd'))!;
    expect(injected.field).toBe("'=cmd()");
    expect(injected.variety).toBe("'-2+3");
    expect(text).not.toMatch(/(^|,)=cmd/m);
    const a = records.find((r) => r.field === 'A North')!;
    expect(a).toMatchObject({ credit_status: 'eligible', verdict: 'meets', decision_basis: 'point', days_in_window: '156', walk_id: s.walks.aUsed, walk_qualifies: 'true', content_hash: v1.body.contentHash, version: '1', status: 'final' });
    expect(Number(a.credit_lb_n)).toBeCloseTo(500, 3);
    expect(Number(a.area_ac)).toBe(10);
    const total = at(records, -1, 'totals row');
    expect(total.field).toBe('TOTAL');
    expect(Number(total.credit_kg_n)).toBeCloseTo(510.291, 3);
    expect(Number(total.credit_lb_n)).toBeCloseTo(1125, 3);
    expect(Number(total.eligible_area_ha)).toBeCloseTo(9.1054, 4);
    expect(total.credit_status).toBe('2 of 9 fields eligible');
  });

  it('writes a PDF with Lato embedded whose text holds the totals and the content hash', async () => {
    const { agent, csrf } = await signInApi(t.app, 'clerk@crowntip.test');
    const v1 = await agent.post('/api/registers').set('X-CSRF-Token', csrf).send({ ranchId: s.ranchId, year: YEAR });
    const res = await agent.get(`/api/registers/${v1.body.id}.pdf?paper=letter`).buffer(true).parse((r, cb) => {
      const chunks: Buffer[] = [];
      r.on('data', (c: Buffer) => chunks.push(c));
      r.on('end', () => cb(null, Buffer.concat(chunks)));
    });
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toBe('application/pdf');
    const pdf = res.body as Buffer;
    expect(pdf.subarray(0, 5).toString()).toBe('%PDF-');
    expect(pdf.includes(Buffer.from('Lato'))).toBe(true);
    const { text } = await extractText(await getDocumentProxy(new Uint8Array(pdf)), { mergePages: true });
    expect(text).toContain('Hand-Worked Ranch');
    expect(text).toContain('Credit total: 1,125 lb N (510.3 kg N)');
    expect(text).toContain('eligible: 2');
    expect(text).toContain('eligible area: 22.5 ac');
    expect(text).toContain(v1.body.contentHash);
    expect(text).toContain('Credit rule: version 2');
    expect(text).toContain('The sample was taken 45 days before termination');
    expect(text).toContain('screening estimates');
  });
});

describe('who may do what', () => {
  it('answers 401 signed out, 403 to samplers and to auditors finalising, 400 on bad input, 404 across organisations', async () => {
    const anon = request(t.app);
    expect((await anon.get(`/api/registers?ranchId=${s.ranchId}&year=${YEAR}`)).status).toBe(401);
    expect((await anon.get('/api/registers/x.csv')).status).toBe(401);

    const sampler = await signInApi(t.app, 'sampler@crowntip.test');
    const sRes = await sampler.agent.get(`/api/registers?ranchId=${s.ranchId}&year=${YEAR}`);
    expect(sRes.status).toBe(403);
    expect(sRes.body.error.code).toBe('forbidden');
    expect((await sampler.agent.post('/api/registers').set('X-CSRF-Token', sampler.csrf).send({ ranchId: s.ranchId, year: YEAR })).status).toBe(403);

    const auditor = await signInApi(t.app, 'auditor@crowntip.test');
    expect((await auditor.agent.get(`/api/registers?ranchId=${s.ranchId}&year=${YEAR}`)).status).toBe(200);
    const aPost = await auditor.agent.post('/api/registers').set('X-CSRF-Token', auditor.csrf).send({ ranchId: s.ranchId, year: YEAR });
    expect(aPost.status).toBe(403);

    const clerk = await signInApi(t.app, 'clerk@crowntip.test');
    const noCsrf = await clerk.agent.post('/api/registers').send({ ranchId: s.ranchId, year: YEAR });
    expect(noCsrf.status).toBe(403);
    expect(noCsrf.body.error.code).toBe('csrf');
    const bad = await clerk.agent.post('/api/registers').set('X-CSRF-Token', clerk.csrf).send({ year: '20x5' });
    expect(bad.status).toBe(400);
    expect(bad.body.error.code).toBe('invalid');
    expect(Object.keys(bad.body.error.fields).sort()).toEqual(['ranchId', 'year']);
    const badQuery = await clerk.agent.get(`/api/registers?ranchId=${s.ranchId}&year=1850`);
    expect(badQuery.status).toBe(400);
    expect(badQuery.body.error.fields).toHaveProperty('year');
    expect((await clerk.agent.get(`/api/registers/versions?year=${YEAR}`)).body.error.fields).toHaveProperty('ranchId');
    expect((await clerk.agent.get(`/api/registers?ranchId=nope&year=${YEAR}`)).status).toBe(404);

    const v1 = await clerk.agent.post('/api/registers').set('X-CSRF-Token', clerk.csrf).send({ ranchId: s.ranchId, year: YEAR });
    expect(v1.status).toBe(201);
    expect((await auditor.agent.get(`/api/registers/${v1.body.id}`)).status).toBe(200);
    expect((await auditor.agent.get(`/api/registers/${v1.body.id}.pdf`)).status).toBe(200);
    expect((await auditor.agent.patch(`/api/registers/${v1.body.id}`).set('X-CSRF-Token', auditor.csrf).send({})).status).toBe(403);

    // Another organisation: the ranch and the register are simply not there.
    const other = await signInApi(t.app, 'admin@quillwater.test');
    for (const path of [`/api/registers/${v1.body.id}`, `/api/registers/${v1.body.id}.csv`, `/api/registers/${v1.body.id}.pdf`, `/api/registers?ranchId=${s.ranchId}&year=${YEAR}`]) {
      const res = await other.agent.get(path);
      expect(res.status, path).toBe(404);
      expect(res.body.error.code).toBe('not_found');
    }
    const otherPost = await other.agent.post('/api/registers').set('X-CSRF-Token', other.csrf).send({ ranchId: s.ranchId, year: YEAR });
    expect(otherPost.status).toBe(404);
    expect((await other.agent.get(`/api/registers/versions?ranchId=${s.ranchId}&year=${YEAR}`)).body.total).toBe(0);
    expect((await other.agent.patch(`/api/registers/${v1.body.id}`).set('X-CSRF-Token', other.csrf).send({})).status).toBe(404);
  });

  it('gives each role the expected office pages', async () => {
    const { agent, csrf } = await signInApi(t.app, 'clerk@crowntip.test');
    const v1 = await agent.post('/api/registers').set('X-CSRF-Token', csrf).send({ ranchId: s.ranchId, year: YEAR });
    const paths = ['/registers', `/registers?year=${YEAR}`, `/registers/${s.ranchId}/${YEAR}`, `/registers/v/${v1.body.id}`, `/registers/v/${v1.body.id}?paper=letter`];
    const expected = { 'admin@crowntip.test': 200, 'clerk@crowntip.test': 200, 'auditor@crowntip.test': 200, 'sampler@crowntip.test': 403, 'admin@quillwater.test': 200 };
    for (const [email, status] of Object.entries(expected)) {
      const pages = await signInPages(t.app, email);
      for (const path of paths) {
        const res = await pages.get(path);
        const want = email === 'admin@quillwater.test' && path.includes(s.ranchId) ? 404 : email === 'admin@quillwater.test' && path.includes('/v/') ? 404 : status;
        expect(res.status, `${email} ${path}`).toBe(want);
      }
    }
    expect((await request(t.app).get('/registers')).headers.location).toBe('/login?next=%2Fregisters');
    const pages = await signInPages(t.app, 'clerk@crowntip.test');
    expect((await pages.get(`/registers/${s.ranchId}/1850`)).status).toBe(404);
    expect((await pages.get(`/registers/v/nope`)).status).toBe(404);
  });
});

describe('office pages', () => {
  it('lets a clerk finalise from the draft page and shows the version with its provenance', async () => {
    const clerk = await signInPages(t.app, 'clerk@crowntip.test');
    const draft = await clerk.get(`/registers/${s.ranchId}/${YEAR}`);
    expect(draft.text).toContain('Finalise register');
    expect(draft.text).toContain('The sample was taken 45 days before termination');
    expect(draft.text).toContain('Ridgeline');
    expect(draft.text).toContain('1,125 lb N');
    const token = csrfFromHtml(draft.text);
    const unconfirmed = await clerk.post(`/registers/${s.ranchId}/${YEAR}`).type('form').send({ _csrf: token });
    expect(unconfirmed.status).toBe(400);
    expect(unconfirmed.text).toContain('Tick the box');
    const posted = await clerk.post(`/registers/${s.ranchId}/${YEAR}`).type('form').send({ _csrf: token, confirm: 'yes' });
    expect(posted.status).toBe(303);
    const id = locationOf(posted).split('/').pop()!;
    const page = await clerk.get(locationOf(posted));
    expect(page.status).toBe(200);
    const stored = await t.db('registers').where('id', id).first();
    expect(page.text).toContain(stored.content_hash);
    expect(page.text).toContain('matches the stored snapshot');
    expect(page.text).toContain('Register finalised as version 1.');
    expect(page.text).toContain('Credit rule version 2');
    expect(page.text).toContain('cal-rye-test version 3');
    expect(page.text).toContain(s.walks.aUsed);
    expect(page.text).toContain('Jonah Pellbrook');
    expect(page.text).toContain('register-paper-a4');
    expect(page.text).toContain('screening estimates');
    expect((await clerk.get(`/registers/v/${id}?paper=letter`)).text).toContain('register-paper-letter');

    // The auditor reads the same page without the Send or Finalise controls.
    const auditor = await signInPages(t.app, 'auditor@crowntip.test');
    const seen = await auditor.get(`/registers/v/${id}`);
    expect(seen.text).toContain(stored.content_hash);
    expect(seen.text).not.toContain('Send to grower');
    expect((await auditor.get(`/registers/${s.ranchId}/${YEAR}`)).text).not.toContain('Finalise register');
    const refused = await auditor.post(`/registers/${s.ranchId}/${YEAR}`).type('form').send({ _csrf: csrfFromHtml(seen.text), confirm: 'yes' });
    expect(refused.status).toBe(403);

    // Amendment: the draft lists the changes, the new version lists them against version 1.
    await t.db('plantings').where('id', s.plantings.c).update({ terminated_on: '2025-03-25' });
    const draft2 = await clerk.get(`/registers/${s.ranchId}/${YEAR}`);
    expect(draft2.text).toContain('Changes since version 1');
    expect(draft2.text).toContain('Finalise amendment (version 2)');
    const amended = await clerk.post(`/registers/${s.ranchId}/${YEAR}`).type('form').send({ _csrf: csrfFromHtml(draft2.text), confirm: 'yes' });
    const v2 = await clerk.get(locationOf(amended));
    expect(v2.text).toContain('Amendment: changes from version 1');
    expect(v2.text).toContain('data-diff-field="C Early Walk" data-diff-key="verdict"');
    expect(v2.text).toContain('1,375 lb N');
    // Finalising once more without a change is refused and said so.
    const draft3 = await clerk.get(`/registers/${s.ranchId}/${YEAR}`);
    const same = await clerk.post(`/registers/${s.ranchId}/${YEAR}`).type('form').send({ _csrf: csrfFromHtml(draft3.text), confirm: 'yes' });
    expect(same.status).toBe(303);
    expect((await clerk.get(locationOf(same))).text).toContain('Nothing changed since version 2');
  });

  it('shows the organisation summary with a bar chart of credit by ranch', async () => {
    const summary = await organisationSummary(t.db, ORG, YEAR, TODAY);
    const hand = summary.ranches.find((r) => r.ranchName === 'Hand-Worked Ranch')!;
    expect(hand.final).toBeNull();
    expect(hand.shown.creditKgN).toBeCloseTo(1125 * LB, 9);
    expect(summary.totals.fields).toBe(summary.ranches.reduce((n, r) => n + r.shown.fields, 0));

    const admin = await signInPages(t.app, 'admin@crowntip.test');
    const page = await admin.get(`/registers?year=${YEAR}`);
    expect(page.status).toBe(200);
    expect(page.text).toContain('<svg');
    expect(page.text).toContain('Credit by ranch');
    expect(page.text).toContain('Hand-Worked Ranch: 1,125 lb N (draft)');
    expect(page.text).toContain('Sandpiper Bench');
    expect(page.text).toContain('Build the organisation’s register');
    expect(page.text).toContain('href="/registers"');
  });

  it('sends the PDF to the ranch’s grower addresses and shows it in the Outbox', async () => {
    const clerk = await signInPages(t.app, 'clerk@crowntip.test');
    const draft = await clerk.get(`/registers/${s.ranchId}/${YEAR}`);
    const posted = await clerk.post(`/registers/${s.ranchId}/${YEAR}`).type('form').send({ _csrf: csrfFromHtml(draft.text), confirm: 'yes' });
    const page = await clerk.get(locationOf(posted));
    expect(page.text).toContain('PDF to grower@handworked.test, office@handworked.test');
    const id = locationOf(posted).split('/').pop()!;
    // First a confirmation page (no script needed): who gets what; nothing is sent yet.
    const ask = await clerk.post(`/registers/v/${id}/send`).type('form').send({ _csrf: csrfFromHtml(page.text) });
    expect(ask.status).toBe(200);
    expect(ask.text).toContain('data-confirm-page');
    expect(ask.text).toContain('To: grower@handworked.test, office@handworked.test');
    expect(ask.text).toContain('name="confirmed" value="yes"');
    expect(await t.db('mail_outbox').where('subject', 'like', 'Credit register%')).toHaveLength(0);
    // The page's form also asks in a dialog when script runs (client/office.ts).
    expect(page.text).toMatch(/data-confirm-page data-confirm="Send version 1 of this register as PDF to grower@handworked.test, office@handworked.test\?/);
    const sent = await clerk.post(`/registers/v/${id}/send`).type('form').send({ _csrf: csrfFromHtml(ask.text), confirmed: 'yes' });
    expect(sent.status).toBe(303);
    expect((await clerk.get(locationOf(sent))).text).toContain('sent as PDF to grower@handworked.test, office@handworked.test');
    const mail = await t.db('mail_outbox').where('to_address', 'grower@handworked.test, office@handworked.test').first();
    expect(mail).toBeTruthy();
    expect(mail.organisation_id).toBe(ORG);
    expect(mail.subject).toBe('Credit register 2025: Hand-Worked Ranch (version 1)');
    const attachment = only(jsonValue<{ filename: string; contentType: string; size: number }[]>(mail.attachments)!, 'attachment');
    expect(attachment.filename).toBe('crowntip-register-hand-worked-ranch-2025-v1.pdf');
    expect(attachment.contentType).toBe('application/pdf');
    expect(attachment.size).toBeGreaterThan(1000);
    expect(mail.text_body).toContain('Credit total: 1,125 lb N');
    expect(mail.raw).toContain('Content-Type: application/pdf');

    const admin = await signInPages(t.app, 'admin@crowntip.test');
    const outbox = await admin.get(`/admin/outbox/${mail.id}`);
    expect(outbox.text).toContain('crowntip-register-hand-worked-ranch-2025-v1.pdf (application/pdf');

    // The auditor may not send; a ranch without addresses cannot be sent to.
    const auditor = await signInPages(t.app, 'auditor@crowntip.test');
    const aPage = await auditor.get(`/registers/v/${id}`);
    expect((await auditor.post(`/registers/v/${id}/send`).type('form').send({ _csrf: csrfFromHtml(aPage.text), confirmed: 'yes' })).status).toBe(403);
    await t.db('ranches').where('id', s.ranchId).update({ contact_emails: null });
    const bare = await clerk.get(`/registers/v/${id}`);
    expect(bare.text).toMatch(/disabled aria-describedby="send-hint">Send to grower/);
    const refused = await clerk.post(`/registers/v/${id}/send`).type('form').send({ _csrf: csrfFromHtml(bare.text), confirmed: 'yes' });
    expect((await clerk.get(locationOf(refused))).text).toContain('no grower addresses');
    expect(await t.db('mail_outbox').where('subject', 'like', 'Credit register%').count({ n: '*' }).first()).toEqual({ n: 1 });
  });
});
