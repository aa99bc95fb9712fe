import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { createTestApp, type TestApp } from '../../helpers/app';
import { seedDemoHistory } from '../../../seeds/06_demo_history';
import { computeRegisters } from '../../../server/registers/service';
import { DEMO_ORGANISATIONS } from '../../../seeds/demo-people';
import { seasonOfDate, seasonStartYear, todayIso } from '../../../shared/registry/season';

let t: TestApp;
beforeEach(async () => {
  t = await createTestApp();
});
afterEach(async () => {
  await t.close();
});

// The demo's past walks exist so that `npm start` shows a register with credits; this checks that
// the invented scenario keeps doing that (eligible rows, refused rows, a walk too early).
describe('demo history', () => {
  it('gives last season’s register eligible fields, fields below the threshold and a walk too early', async () => {
    const today = todayIso();
    await seedDemoHistory(t.db, today);
    await seedDemoHistory(t.db, today); // safe to run twice
    const year = seasonStartYear(seasonOfDate(today));
    const registers = await computeRegisters(t.db, DEMO_ORGANISATIONS[0].id, year, today);
    const rows = registers.flatMap((r) => r.rows);
    const codes = rows.flatMap((r) => r.reasons.map((x) => x.code));
    expect(rows.filter((r) => r.eligible).length).toBeGreaterThan(3);
    expect(codes).toContain('below_threshold');
    expect(codes).toContain('sample_too_early');
    expect(codes).toContain('crop_not_eligible');
    const walks = await t.db('field_walks').where('notes', 'Invented demo walk of last season.');
    expect(new Set(walks.map((w) => w.id)).size).toBe(walks.length);
    expect(walks.every((w) => w.status === 'approved')).toBe(true);
    // Rye and triticale have demo calibrations; barley, oats and wheat have none, so no estimate.
    expect(walks.filter((w) => w.estimate).length).toBeGreaterThanOrEqual(10);
  });
});
