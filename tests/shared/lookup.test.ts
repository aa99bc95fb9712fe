import { describe, expect, it } from 'vitest';
import { fitCalibration, inToCm, kgPerHaToLbPerAc, lookupTable, predict } from '../../shared/calc';
import { readDemo } from './demo-data';
import { codeOf } from './prng';

const rye = fitCalibration(readDemo('cereal-rye').rows, 'power');

describe('lookupTable', () => {
  it('1-inch steps over the calibrated range by default, both unit systems', () => {
    const rows = lookupTable(rye, { unit: 'in', step: 1 });
    const [lo, hi] = rye.xRange;
    expect(rows[0]?.length).toBe(Math.ceil(lo / 2.54));
    expect(rows.at(-1)?.length).toBe(Math.floor(hi / 2.54));
    for (const r of rows) {
      expect(Number.isInteger(r.length)).toBe(true);
      expect(r.lengthCm).toBeCloseTo(inToCm(r.length), 12);
      expect(r.biomassKgHa).toBe(predict(rye, r.lengthCm));
      expect(r.biomassLbAc).toBeCloseTo(kgPerHaToLbPerAc(r.biomassKgHa), 9);
      expect(r.extrapolated).toBe(false);
    }
    const at31 = rows.find((r) => r.length === 31);
    expect(at31?.biomassLbAc).toBeGreaterThan(4300);
    expect(at31?.biomassLbAc).toBeLessThan(4700);
  });

  it('2-cm steps with explicit bounds outside the range flag extrapolation', () => {
    const rows = lookupTable(rye, { unit: 'cm', step: 2, from: 4, to: 150 });
    expect(rows).toHaveLength(74);
    expect(rows[0]).toMatchObject({ length: 4, lengthCm: 4, extrapolated: true });
    expect(rows[rows.length - 1]).toMatchObject({ length: 150, extrapolated: true });
    expect(rows.find((r) => r.length === 80)?.extrapolated).toBe(false);
  });

  it('fractional steps do not drift', () => {
    const rows = lookupTable(rye, { unit: 'in', step: 0.1, from: 30, to: 31 });
    expect(rows.map((r) => r.length)).toEqual([30, 30.1, 30.2, 30.3, 30.4, 30.5, 30.6, 30.7, 30.8, 30.9, 31]);
  });

  it.each([
    ['bad unit', { unit: 'mm', step: 1 }, 'bad_option'],
    ['zero step', { unit: 'cm', step: 0 }, 'non_positive'],
    ['NaN step', { unit: 'cm', step: NaN }, 'not_finite'],
    ['from > to', { unit: 'cm', step: 1, from: 50, to: 40 }, 'bad_option'],
    ['zero start on a power curve', { unit: 'cm', step: 1, from: 0, to: 40 }, 'non_positive'],
    ['too many rows', { unit: 'cm', step: 0.001, from: 1, to: 100 }, 'too_many_rows'],
  ])('%s → %s', (_n, opts, code) => {
    expect(codeOf(() => lookupTable(rye, opts as never))).toBe(code);
  });
});
