import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
  CalcError, acToHa, cmToIn, haToAc, inToCm, kgPerHaToLbPerAc, lbPerAcToKgPerHa,
} from '../../shared/calc';
import { at } from '../helpers/lists';

// Exact factors: NIST SP 811 (2008) Appendix B and NIST Handbook 44 Appendix C:
// 1 in = 2.54 cm, 1 lb = 0.45359237 kg (both exact); 1 acre = 43,560 ft² with the international
// foot 0.3048 m = 4046.8564224 m² (exact; the survey-foot acre, 4046.873 m², was retired in 2023).
describe('unit conversions (NIST SP 811 / HB 44 App. C)', () => {
  it.each<[string, (v: number) => number, number, number, string]>([
    // [function, input, expected, source]
    ['inToCm', inToCm, 1, 2.54, 'SP 811: 1 in = 2.54 cm exactly'],
    ['inToCm', inToCm, 31, 78.74, 'rule of thumb 31 in (product brief) in cm'],
    ['cmToIn', cmToIn, 2.54, 1, 'SP 811'],
    ['lbPerAcToKgPerHa', lbPerAcToKgPerHa, 1, 0.45359237 / 0.40468564224, 'SP 811 lb and acre factors'],
    ['acToHa', acToHa, 1, 0.40468564224, 'HB 44 App. C: 1 acre = 4046.8564224 m²'],
    ['haToAc', haToAc, 0.40468564224, 1, 'HB 44 App. C'],
    ['kgPerHaToLbPerAc', kgPerHaToLbPerAc, 1.12085115619445605, 1, 'inverse of the factor above (18 digits, exact decimal division)'],
  ])('%s', (_n, f, input, expected) => {
    expect(f(input)).toBeCloseTo(expected, 9);
  });

  it('4,500 lb/ac is 5,043.83 kg/ha (product brief: "about 5,044 kg/ha")', () => {
    // 4500 × 0.45359237 / 0.40468564224 = 5043.8302… (the issue text says 5043.9…; the exact
    // factors give 5043.83, which still rounds to the brief's 5,044).
    expect(lbPerAcToKgPerHa(4500)).toBeCloseTo(5043.8302, 4);
    expect(Math.round(lbPerAcToKgPerHa(4500))).toBe(5044);
  });

  it('round trips to 1e-12 (property)', () => {
    const pairs: Array<[(v: number) => number, (v: number) => number]> = [
      [inToCm, cmToIn],
      [lbPerAcToKgPerHa, kgPerHaToLbPerAc],
      [acToHa, haToAc],
    ];
    fc.assert(
      fc.property(fc.double({ min: -1e9, max: 1e9, noNaN: true, noDefaultInfinity: true }), fc.integer({ min: 0, max: 2 }), (v, k) => {
        const [there, back] = at(pairs, k, 'conversion pair');
        const r1 = back(there(v));
        const r2 = there(back(v));
        const tol = 1e-12 * Math.max(1e-300, Math.abs(v));
        return Math.abs(r1 - v) <= tol && Math.abs(r2 - v) <= tol;
      }),
      { numRuns: 2000 },
    );
  });

  it('rejects non-finite input with a typed error, every converter', () => {
    const all = [inToCm, cmToIn, lbPerAcToKgPerHa, kgPerHaToLbPerAc, acToHa, haToAc];
    for (const f of all) {
      for (const bad of [NaN, Infinity, -Infinity, '5' as unknown as number]) {
        let code = 'none';
        try {
          f(bad);
        } catch (e) {
          code = e instanceof CalcError ? e.code : 'other';
        }
        expect(code, `${f.name}(${String(bad)})`).toBe('not_finite');
      }
    }
  });
});
