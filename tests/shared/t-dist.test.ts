import { describe, expect, it } from 'vitest';
import { CalcError, tCritical, tQuantile } from '../../shared/calc';

// Reference: NIST/SEMATECH e-Handbook of Statistical Methods, section 1.3.6.7.2, "Critical Values
// of the Student's t Distribution" (upper-tail probabilities 0.10 … 0.005, values to 3 decimals).
// Checked against a stored reproduction of that table (pdfcoffee.com "Student t distribution table",
// credited to the e-Handbook); the table is rounded to 3 decimals, hence the 0.0005 tolerance.
const NIST_TABLE: Array<[df: number, upperTail: number, t: number]> = [
  [1, 0.10, 3.078], [1, 0.05, 6.314], [1, 0.025, 12.706], [1, 0.01, 31.821], [1, 0.005, 63.657],
  [2, 0.10, 1.886], [2, 0.05, 2.920], [2, 0.025, 4.303], [2, 0.01, 6.965], [2, 0.005, 9.925],
  [5, 0.10, 1.476], [5, 0.05, 2.015], [5, 0.025, 2.571], [5, 0.01, 3.365], [5, 0.005, 4.032],
  [8, 0.025, 2.306],
  [10, 0.10, 1.372], [10, 0.05, 1.812], [10, 0.025, 2.228], [10, 0.01, 2.764], [10, 0.005, 3.169],
  [20, 0.05, 1.725], [20, 0.025, 2.086], [20, 0.005, 2.845],
  [30, 0.10, 1.310], [30, 0.05, 1.697], [30, 0.025, 2.042], [30, 0.01, 2.457], [30, 0.005, 2.750],
  [60, 0.05, 1.671], [60, 0.025, 2.000],
  [100, 0.10, 1.290], [100, 0.05, 1.660], [100, 0.025, 1.984], [100, 0.005, 2.626],
];

describe("Student's t quantiles vs NIST e-Handbook 1.3.6.7.2", () => {
  it.each(NIST_TABLE)('df=%d, upper tail %d → %d', (df, upper, t) => {
    expect(Math.abs(tQuantile(1 - upper, df) - t)).toBeLessThanOrEqual(0.0005);
    // Two-sided level 1 − 2·upper gives the same value.
    expect(Math.abs(tCritical(1 - 2 * upper, df) - t)).toBeLessThanOrEqual(0.0005);
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
  });
});
