import { describe, expect, it } from 'vitest';
import { parse } from 'csv-parse/sync';
import { signInApi, signInPages, type TestApp } from '../../helpers/app';
import { ORG, YEAR, estimateSnapshot, freshScenarioForEachTest, type HandWorkedScenario } from '../../helpers/register-scenario';
import { canonicalJson, computeRegister, sha256Hex, type RegisterRow } from '../../../server/registers/service';

/*
 * A register row takes its walk's verdict from the walk's stored snapshot. Scenario: the
 * hand-worked register of tests/server/registers/registers.test.ts (threshold 4,500 lb/ac =
 * 5,043.83 kg/ha; A North, 10 ac, earns 50 lb N/ac × 10 ac = 500 lb N with its walk of
 * 2025-03-05 at 6,000 kg/ha).
 *
 * Units by hand (exact factors: 1 lb = 0.45359237 kg, 1 ac = 0.40468564224 ha):
 *   1 kg/ha = 0.40468564224 / 0.45359237 lb/ac = 0.8921791216 lb/ac
 *   6,000 kg/ha → 5,353.07 lb/ac → "5,353 lb/ac"
 *   4,500 kg/ha → 4,014.81 lb/ac → "4,015"
 *   6,500 kg/ha → 5,799.16 lb/ac → "5,799"
 */
const TODAY = '2026-12-01';

let t: TestApp;
let s: HandWorkedScenario;
freshScenarioForEachTest((app, scenario) => {
  t = app;
  s = scenario;
});

const rowOf = (rows: RegisterRow[], name: string) => rows.find((r) => r.fieldName === name)!;

/** A snapshot as new walks store it: point_with_borderline at 90 %, its 90 % combined range 4,500–6,500 kg/ha spanning the threshold. */
function borderlineSnapshot() {
  const base = estimateSnapshot(6000);
  return {
    ...base,
    verdict: 'borderline',
    decisionBasis: 'point_with_borderline',
    ruleVersionId: 'rule-v2-test',
    combinedInterval: [4500, 6500],
    reasons: [
      { code: 'point_meets', biomassKgHa: 6000, thresholdKgHa: base.thresholdKgHa },
      { code: 'interval_spans_threshold', lowKgHa: 4500, highKgHa: 6500, thresholdKgHa: base.thresholdKgHa, level: 0.9 },
    ],
  };
}

describe('register rows and the walk verdict', () => {
  it('a borderline walk earns no credit and says why in the reader’s units, on the page and in the CSV', async () => {
    await t.db('field_walks').where({ id: s.walks.aUsed }).update({ estimate: JSON.stringify(borderlineSnapshot()) });
    const reg = (await computeRegister(t.db, ORG, s.ranchId, YEAR, TODAY))!;
    const a = rowOf(reg.rows, 'A North');
    expect(a.walk?.verdict).toBe('borderline');
    expect(a.walk?.decisionBasis).toBe('point_with_borderline');
    expect(a.walk?.ruleVersionId).toBe('rule-v2-test');
    expect(a.verdict).toBe('not_eligible');
    expect(a.creditKgN).toBe(0);
    expect(a.reasons.map((r) => r.code)).toEqual(['walk_borderline']);
    // Totals lose A North's 500 lb N: only D Boundary's 625 lb N (283.49523125 kg N) remain.
    expect(reg.totals.eligibleFields).toBe(1);
    expect(reg.totals.creditKgN).toBeCloseTo(625 * 0.45359237, 9);

    const page = await (await signInPages(t.app, 'clerk@crowntip.test')).get(`/registers/${s.ranchId}/${YEAR}`);
    expect(page.status).toBe(200);
    const row = page.text.slice(page.text.indexOf('>A North<'), page.text.indexOf('>B Legume<'));
    expect(row).toContain('class="badge-borderline" data-walk-verdict="borderline"');
    expect(row).not.toContain('badge-good');
    expect(row).toContain('data-walk-biomass>5,353 lb/ac<');
    expect(row).toContain('The approved walk of Mar 5, 2025 is borderline: The estimate, 5,353 lb/ac, is at or above the 4,500 lb/ac threshold.');
    expect(row).toContain('The 90% range (4,015–5,799 lb/ac) spans the 4,500 lb/ac threshold');
    expect(row).toContain('It does not earn the credit until it is settled.');
    expect(row).not.toMatch(/kg\/ha/);

    const { agent, csrf } = await signInApi(t.app, 'clerk@crowntip.test');
    const v1 = await agent.post('/api/registers').set('X-CSRF-Token', csrf).send({ ranchId: s.ranchId, year: YEAR });
    expect(v1.status).toBe(201);
    const csv = await agent.get(`/api/registers/${v1.body.id}.csv`);
    const records: Record<string, string>[] = parse(csv.text.replace(/^\uFEFF/, ''), { columns: true });
    const ca = records.find((r) => r.field === 'A North')!;
    expect(ca).toMatchObject({ verdict: 'borderline', decision_basis: 'point_with_borderline', rule_version: 'rule-v2-test', credit_status: 'not_eligible', biomass_shown: '5,353 lb/ac', biomass_kg_ha: '6000' });
    expect(ca.reasons).toContain('The approved walk of Mar 5, 2025 is borderline');
    // Old snapshots (no stored verdict) read as the point estimate: D Boundary, 5,100 ≥ 5,043.83 kg/ha.
    expect(records.find((r) => r.field === 'D Boundary')).toMatchObject({ verdict: 'meets', decision_basis: 'point', rule_version: '', credit_status: 'eligible' });
  });

  it('under a lower-bound rule a walk whose point estimate meets but whose verdict is below earns nothing', async () => {
    const snap = { ...estimateSnapshot(6000), verdict: 'below', decisionBasis: 'lower_bound', ruleVersionId: 'r', combinedInterval: [4600, 7400], reasons: [{ code: 'lower_bound_below', lowerBoundKgHa: 4800, thresholdKgHa: estimateSnapshot(0).thresholdKgHa, confidence: 0.9 }] };
    await t.db('field_walks').where({ id: s.walks.aUsed }).update({ estimate: JSON.stringify(snap) });
    const a = rowOf((await computeRegister(t.db, ORG, s.ranchId, YEAR, TODAY))!.rows, 'A North');
    expect(a.verdict).toBe('not_eligible');
    expect(a.reasons.map((r) => r.code)).toEqual(['walk_below']);
  });
});

describe('finalised versions never change', () => {
  it('keeps a version finalised before walks carried verdicts: its hash verifies and it reads as the point estimate', async () => {
    const { agent, csrf } = await signInApi(t.app, 'clerk@crowntip.test');
    const v1 = await agent.post('/api/registers').set('X-CSRF-Token', csrf).send({ ranchId: s.ranchId, year: YEAR });
    // Make v1 what a version finalised before this change looked like: no walk verdict, no N.
    const stored = await t.db('registers').where({ id: v1.body.id }).first();
    const snap = JSON.parse(stored.snapshot);
    for (const r of snap.rows) {
      if (r.walk) for (const k of ['verdict', 'decisionBasis', 'ruleVersionId', 'combinedInterval', 'thresholdKgHa', 'tissueNPercent', 'shootN']) delete r.walk[k];
      for (const reason of r.reasons) delete reason.data;
    }
    const oldText = canonicalJson(snap);
    await t.db('registers').where({ id: v1.body.id }).update({ snapshot: oldText, content_hash: sha256Hex(oldText) });

    // The walk becomes borderline afterwards: the draft changes, the finalised version does not.
    await t.db('field_walks').where({ id: s.walks.aUsed }).update({ estimate: JSON.stringify(borderlineSnapshot()), tissue_n_percent: 2 });
    const shown = await agent.get(`/api/registers/${v1.body.id}`);
    expect(shown.body.hashVerified).toBe(true);
    expect(shown.body.rows.find((r: RegisterRow) => r.fieldName === 'A North').verdict).toBe('eligible');
    expect((await t.db('registers').where({ id: v1.body.id }).first()).snapshot).toBe(oldText);

    const page = await (await signInPages(t.app, 'auditor@crowntip.test')).get(`/registers/v/${v1.body.id}`);
    const row = page.text.slice(page.text.indexOf('>A North<'), page.text.indexOf('>B Legume<'));
    expect(row).toContain('data-walk-verdict="meets"'); // 6,000 ≥ 5,043.83 kg/ha, the point estimate
    expect(row).not.toContain('data-shoot-n');
    const csv = parse((await agent.get(`/api/registers/${v1.body.id}.csv`)).text.replace(/^\uFEFF/, ''), { columns: true }) as Record<string, string>[];
    expect(csv.find((r) => r.field === 'A North')).toMatchObject({ verdict: 'meets', decision_basis: 'point', credit_status: 'eligible', shoot_n_kg_ha: '' });

    // A new version picks the new columns up.
    const v2 = await agent.post('/api/registers').set('X-CSRF-Token', csrf).send({ ranchId: s.ranchId, year: YEAR });
    expect(v2.status).toBe(201);
    const a2 = v2.body.rows.find((r: RegisterRow) => r.fieldName === 'A North');
    expect(a2.walk.verdict).toBe('borderline');
    // 6,000 kg/ha × 2 % = 120 kg N/ha; the combined range 4,500–6,500 × 2 % = 90–130.
    expect(a2.walk.shootN.kgNPerHa).toBeCloseTo(120, 10);
    expect(a2.walk.shootN.interval[0]).toBeCloseTo(90, 10);
    expect(a2.walk.shootN.interval[1]).toBeCloseTo(130, 10);
    expect(a2.verdict).toBe('not_eligible');
  });
});
