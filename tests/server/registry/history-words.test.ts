import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { createTestApp, signInPages, type TestApp } from '../../helpers/app';
import { DEMO_ORGANISATIONS, DEMO_USERS } from '../../../seeds/demo-people';
import { contextFor } from '../../../server/platform/context';
import { updatePlanting } from '../../../server/registry/service';
import { historySummary } from '../../../server/registry/history-words';
import { lbPerAcToKgPerHa } from '../../../shared/calc/units';

let t: TestApp;
const ORG = DEMO_ORGANISATIONS[0].id;
const CLERK = DEMO_USERS.find((u) => u.email === 'clerk@crowntip.test')!;

beforeEach(async () => {
  t = await createTestApp();
});
afterEach(async () => {
  await t.close();
});

describe('the change history in words', () => {
  it('names crops, fields and values in words and the reader’s units, with the time and its zone', async () => {
    const p = await t.db('plantings').where({ organisation_id: ORG, crop: 'cereal_rye' }).first('id');
    const actor = contextFor({ ...CLERK, organisationId: ORG, units: 'us' } as never);
    // 150 lb/ac stored as kg/ha: 150 × 0.45359237 / 0.40468564224 = 168.13 kg/ha (NIST SP 811 factors).
    await updatePlanting(t.db, actor, p.id, { crop: 'triticale', seedingRateKgHa: lbPerAcToKgPerHa(150) });
    const stored = await t.db('change_history').where({ entity_id: p.id, action: 'update' }).orderBy('seq', 'desc').first();
    expect(stored.summary).toMatch(/: crop, seeding rate changed$/);
    expect(stored.summary).not.toMatch(/cereal_rye|seedingRateKgHa/);

    const clerk = await signInPages(t.app, 'clerk@crowntip.test');
    const page = await clerk.get(`/history?entityId=${p.id}`);
    expect(page.status).toBe(200);
    expect(page.text).toContain('<dt class="font-bold">Crop</dt><dd>Cereal rye → Triticale</dd>');
    expect(page.text).toMatch(/<dt class="font-bold">Seeding rate<\/dt><dd>[^<]* → 150 lb\/ac<\/dd>/);
    expect(page.text).toMatch(/<time datetime="[^"]+">[A-Z][a-z]{2} \d{1,2}, \d{4}, \d{2}:\d{2} UTC<\/time>/);
    expect(page.text).toContain('<td>Changed</td>');
    // What a person reads: the machine-readable datetime attributes aside.
    const table = page.text.slice(page.text.indexOf('<table')).replace(/datetime="[^"]*"/g, '');
    expect(table).not.toMatch(/cereal_rye|seedingRateKgHa|plannedTerminationOn|\d{4}-\d\d-\d\dT\d\d:/);
  });

  it('words summaries stored before the history named things in words', () => {
    expect(historySummary('Planting 2026-27 (cereal_rye) created on North 4')).toBe('Planting 2026-27 (Cereal rye) created on North 4');
    expect(historySummary('Field “North 4”: areaHa, boundary changed')).toBe('Field “North 4”: area, boundary changed');
    expect(historySummary('Planting 2026-27 on North 4: plannedTerminationOn changed')).toBe('Planting 2026-27 on North 4: planned termination changed');
    // A name that merely contains such a word is left alone.
    expect(historySummary('Ranch “crop circle” created')).toBe('Ranch “crop circle” created');
  });
});
