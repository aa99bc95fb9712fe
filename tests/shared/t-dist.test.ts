import { describe, expect, it } from 'vitest';
import { CalcError, tCritical, tQuantile, zQuantile } from '../../shared/calc';
import { at } from '../helpers/lists';

const rel = (a: number, b: number) => Math.abs(a - b) / Math.abs(b);

// Exact closed forms of the t quantile (lower tail p):
// - df 1 (Cauchy): t = tan(π(p − ½)).
// - df 2: t = (2p − 1)/√(2p(1 − p)).
// - df 4: with α = 4p(1 − p) and q = cos(⅓·arccos(√α))/√α, t = sign(p − ½)·2·√(q − 1).
//   Source: W. T. Shaw, "Sampling Student's T distribution — use of the inverse cumulative
//   distribution function", Journal of Computational Finance 9(4), 2006 (formula quoted from memory;
//   checked by hand: p = 0.975 gives α = 0.0975, √α = 0.312250, arccos = 1.253236, /3 = 0.417745,
//   cos = 0.913996, q = 2.927126, t = 2·√1.927126 = 2.77644, the table's 2.776 below).
// Near p = ½ the df-4 form itself cancels (q − 1 → 0), so it is checked from p = 0.6 outwards.
const cauchy = (p: number) => Math.tan(Math.PI * (p - 0.5));
const df2 = (p: number) => (2 * p - 1) / Math.sqrt(2 * p * (1 - p));
const df4 = (p: number) => {
  const a = 4 * p * (1 - p);
  const q = Math.cos(Math.acos(Math.sqrt(a)) / 3) / Math.sqrt(a);
  return Math.sign(p - 0.5) * 2 * Math.sqrt(q - 1);
};
const PS = [0.001, 0.01, 0.025, 0.05, 0.1, 0.2, 0.3, 0.4, 0.6, 0.7, 0.75, 0.8, 0.9, 0.95, 0.975, 0.99, 0.995, 0.999];

describe('t quantiles against exact closed forms, 1e-12 relative', () => {
  it.each(PS)('p = %d', (p) => {
    expect(rel(tQuantile(p, 1), cauchy(p))).toBeLessThan(1e-12);
    expect(rel(tQuantile(p, 2), df2(p))).toBeLessThan(1e-12);
    expect(rel(tQuantile(p, 4), df4(p))).toBeLessThan(1e-12);
  });
  it('symmetric about 0 and 0 at p = ½', () => {
    expect(tQuantile(0.5, 7)).toBe(0);
    expect(tQuantile(0.05, 9)).toBeCloseTo(-tQuantile(0.95, 9), 14);
  });
});

// NIST/SEMATECH e-Handbook of Statistical Methods, 1.3.6.7.2 "Critical Values of the Student's t
// Distribution": upper-tail probabilities 0.10 … 0.001, printed to 3 decimals (hence the 0.0005
// tolerance: a value rounded to 3 decimals is within 0.0005 of the exact one). Transcribed from a
// stored copy of the table that carries the e-Handbook's credit line.
const UPPER = [0.1, 0.05, 0.025, 0.01, 0.005, 0.001];
const NIST: Array<[df: number, row: number[]]> = [
  [1, [3.078, 6.314, 12.706, 31.821, 63.657, 318.313]],
  [2, [1.886, 2.920, 4.303, 6.965, 9.925, 22.327]],
  [3, [1.638, 2.353, 3.182, 4.541, 5.841, 10.215]],
  [4, [1.533, 2.132, 2.776, 3.747, 4.604, 7.173]],
  [5, [1.476, 2.015, 2.571, 3.365, 4.032, 5.893]],
  [6, [1.440, 1.943, 2.447, 3.143, 3.707, 5.208]],
  [7, [1.415, 1.895, 2.365, 2.998, 3.499, 4.782]],
  [8, [1.397, 1.860, 2.306, 2.896, 3.355, 4.499]],
  [9, [1.383, 1.833, 2.262, 2.821, 3.250, 4.296]],
  [10, [1.372, 1.812, 2.228, 2.764, 3.169, 4.143]],
  [11, [1.363, 1.796, 2.201, 2.718, 3.106, 4.024]],
  [12, [1.356, 1.782, 2.179, 2.681, 3.055, 3.929]],
  [13, [1.350, 1.771, 2.160, 2.650, 3.012, 3.852]],
  [14, [1.345, 1.761, 2.145, 2.624, 2.977, 3.787]],
  [15, [1.341, 1.753, 2.131, 2.602, 2.947, 3.733]],
  [16, [1.337, 1.746, 2.120, 2.583, 2.921, 3.686]],
  [17, [1.333, 1.740, 2.110, 2.567, 2.898, 3.646]],
  [18, [1.330, 1.734, 2.101, 2.552, 2.878, 3.610]],
  [19, [1.328, 1.729, 2.093, 2.539, 2.861, 3.579]],
  [20, [1.325, 1.725, 2.086, 2.528, 2.845, 3.552]],
  [21, [1.323, 1.721, 2.080, 2.518, 2.831, 3.527]],
  [22, [1.321, 1.717, 2.074, 2.508, 2.819, 3.505]],
  [23, [1.319, 1.714, 2.069, 2.500, 2.807, 3.485]],
  [24, [1.318, 1.711, 2.064, 2.492, 2.797, 3.467]],
  [25, [1.316, 1.708, 2.060, 2.485, 2.787, 3.450]],
  [26, [1.315, 1.706, 2.056, 2.479, 2.779, 3.435]],
  [27, [1.314, 1.703, 2.052, 2.473, 2.771, 3.421]],
  [28, [1.313, 1.701, 2.048, 2.467, 2.763, 3.408]],
  [29, [1.311, 1.699, 2.045, 2.462, 2.756, 3.396]],
  [30, [1.310, 1.697, 2.042, 2.457, 2.750, 3.385]],
  [40, [1.303, 1.684, 2.021, 2.423, 2.704, 3.307]],
  [60, [1.296, 1.671, 2.000, 2.390, 2.660, 3.232]],
  [100, [1.290, 1.660, 1.984, 2.364, 2.626, 3.174]],
  [Infinity, [1.282, 1.645, 1.960, 2.326, 2.576, 3.090]],
];
// The 0.001 column is not the rounded exact value in rows 1 and 7–12: df 1 is tan(0.499π) = 318.3088…
// by the closed form above, printed 318.313; rows 7–12 are printed 0.0006–0.0033 low (another
// published table, the 1959 JASA one reprinted in textbooks, prints 4.785 for df 7 where this one
// prints 4.782). Those seven entries are held to 0.005 only.
const LOOSE = new Set(['1|0.001', '7|0.001', '8|0.001', '9|0.001', '10|0.001', '11|0.001', '12|0.001']);

describe("t quantiles against the NIST e-Handbook table 1.3.6.7.2, to its printed digits", () => {
  it.each(NIST)('df = %d', (df, row) => {
    expect(row).toHaveLength(UPPER.length);
    UPPER.forEach((upper, j) => {
      const printed = at(row, j, 'printed quantile');
      const t = df === Infinity ? zQuantile(1 - upper) : tQuantile(1 - upper, df);
      const tol = LOOSE.has(`${df}|${upper}`) ? 0.005 : 0.0005;
      expect(Math.abs(t - printed), `df ${df}, upper ${upper}`).toBeLessThanOrEqual(tol);
      // Two-sided level 1 − 2·upper gives the same value.
      if (df !== Infinity) expect(Math.abs(tCritical(1 - 2 * upper, df) - printed)).toBeLessThanOrEqual(tol);
    });
  });

  it('the normal quantile to 1e-12 against printed 16-digit values', () => {
    // Φ⁻¹(0.975) = 1.959963984540054, Φ⁻¹(0.95) = 1.644853626951472, Φ⁻¹(0.8) = 0.8416212335729143
    // (standard values, quoted from memory; they agree with the table's 1.960 and 1.645).
    expect(rel(zQuantile(0.975), 1.959963984540054)).toBeLessThan(1e-12);
    expect(rel(zQuantile(0.95), 1.644853626951472)).toBeLessThan(1e-12);
    expect(rel(zQuantile(0.8), 0.8416212335729143)).toBeLessThan(1e-12);
  });

  it('memoised value is identical on repeat', () => {
    expect(tCritical(0.9, 9)).toBe(tCritical(0.9, 9));
  });

  it('rejects bad levels and df with typed errors', () => {
    const code = (f: () => unknown) => {
      try {
        f();
      } catch (e) {
        return e instanceof CalcError ? e.code : 'other';
      }
      return 'none';
    };
    expect(code(() => tCritical(1.2, 5))).toBe('bad_level');
    expect(code(() => tCritical(0, 5))).toBe('bad_level');
    expect(code(() => tQuantile(0.5, 0))).toBe('too_few_points');
    expect(code(() => tQuantile(0.5, NaN))).toBe('too_few_points');
  });
});
