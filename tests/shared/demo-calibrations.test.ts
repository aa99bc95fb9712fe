import { describe, expect, it } from 'vitest';
import { DEMO_RULE, cmToIn, compareModels, fitCalibration, inToCm, lengthForBiomass, predict } from '../../shared/calc';
import { readDemo } from './demo-data';

// Facts of the trade (common practice, no published source; product brief): with the common
// varieties, cereal rye needs about 31 in (79 cm) and triticale about 27 in (69 cm) mean main shoot
// length to reach 4,500 lb/ac. The demo calibrations are invented to agree; checked to ±1.5 in.
describe('demo calibrations (invented demo data)', () => {
  it.each([
    ['cereal-rye', 31],
    ['triticale', 27],
  ] as const)('%s: power curve reaches 4,500 lb/ac at about %d in', (name, inches) => {
    const { header, rows } = readDemo(name);
    expect(header).toBe('length_cm,biomass_kg_ha,site,note');
    expect(rows.length).toBeGreaterThanOrEqual(140);
    expect(rows.length).toBeLessThanOrEqual(160);
    for (const r of rows) {
      expect(r.x).toBeGreaterThanOrEqual(10);
      expect(r.x).toBeLessThanOrEqual(140);
      expect(r.y).toBeGreaterThan(0);
      expect(r.site).toMatch(/^Demo plot \d+$/);
      expect(r.note).toMatch(/demo/);
    }
    const fit = fitCalibration(rows, 'power');
    const at = lengthForBiomass(fit, DEMO_RULE.thresholdKgHa);
    expect(at.ok).toBe(true);
    if (at.ok) expect(Math.abs(cmToIn(at.x) - inches)).toBeLessThanOrEqual(1.5);
    expect(predict(fit, inToCm(inches))).toBeGreaterThan(DEMO_RULE.thresholdKgHa * 0.9);
    // Multiplicative scatter of roughly 20–25 % (log-scale residual SD).
    expect(fit.residualStdError).toBeGreaterThan(0.17);
    expect(fit.residualStdError).toBeLessThan(0.28);
    // The power curve is the one the comparison recommends (or ties for first).
    const c = compareModels(rows);
    expect(c.ranked.findIndex((r) => r.model === 'power')).toBeLessThanOrEqual(1);
  });

  it('barley draft set has about 20 points and fits', () => {
    const { rows } = readDemo('barley');
    expect(rows.length).toBeGreaterThanOrEqual(15);
    expect(rows.length).toBeLessThanOrEqual(25);
    expect(compareModels(rows).recommendation.message).toMatch(/draft/);
  });
});
