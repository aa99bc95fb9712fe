import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { createTestApp, csrfFromHtml, signInPages, type TestApp } from '../../helpers/app';
import { autoMapping, checkRows, emptySnapshot, parseCsv } from '../../../server/registry/import/service';

// One season rule for the planting form and the CSV import (README, "The farm registry"). A
// season is the winter it grows through, July to June: seeded 25 Oct 2026 belongs to 2026-27, so
// season 2027-28 with that date is refused by both, in the same words (worked by hand).
const WORDS = 'Seeded on Oct 25, 2026 belongs to season 2026-27, not 2027-28 (seasons run July to June).';

let t: TestApp;
beforeEach(async () => {
  t = await createTestApp();
});
afterEach(async () => {
  await t.close();
});

describe('a season that contradicts the seeding date', () => {
  it('is refused by the CSV import', () => {
    const parsed = parseCsv(Buffer.from('ranch,field,area_ac,season,crop,seeded_on\nMesa Verde Test,Upper,10,2027-28,Oats,2026-10-25\n'));
    const result = checkRows(parsed, { mapping: autoMapping(parsed.headers, 'us'), snapshot: emptySnapshot(), crops: [{ code: 'oats', label: 'Oats' }] });
    expect(result.problems.filter((p) => p.column === 'season').map((p) => p.message)).toEqual([WORDS]);
  });

  it('is refused by the planting form, beside the season, with the same words', async () => {
    const signedIn = await signInPages(t.app, 'clerk@crowntip.test');
    const fieldRow = await t.db('fields').join('users', 'users.organisation_id', 'fields.organisation_id').where('users.email', 'clerk@crowntip.test').first('fields.id');
    const form = await signedIn.get(`/registry/plantings/new?fieldId=${fieldRow.id}`);
    expect(form.status).toBe(200);
    const res = await signedIn.post('/registry/plantings').type('form').send({
      _csrf: csrfFromHtml(form.text),
      fieldId: fieldRow.id,
      season: '2027-28',
      crop: 'oats',
      seededOn: '2026-10-25',
    });
    expect(res.status).toBe(400);
    expect(res.text).toMatch(/id="season-error"[^>]*>Seeded on Oct 25, 2026 belongs to season 2026-27, not 2027-28 \(seasons run July to June\)\./);
    expect(await t.db('plantings').where({ field_id: fieldRow.id, season: '2027-28' }).first()).toBeUndefined();
  });
});
