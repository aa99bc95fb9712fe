import * as ss from 'simple-statistics';
import { describe, expect, it } from 'vitest';
import { CalcError, summarizeSample } from '../../shared/calc';

function codeOf(f: () => unknown): string {
  try {
    f();
  } catch (e) {
    return e instanceof CalcError ? e.code : `other:${(e as Error).name}`;
  }
  return 'none';
}

describe('summarizeSample', () => {
  it('equal values have no spread, even when their sum is not exact in binary (10 × 81.28)', () => {
    const s = summarizeSample(Array(10).fill(81.28));
    expect(s.sd).toBe(0);
    expect(s.mean).toBe(81.28);
  });

  it('hand check: [2,4,4,4,5,5,7,9]', () => {
    // By hand: mean 5, Σ(x−x̄)² = 32, sd = √(32/7) = 2.138090, se = sd/√8 = 0.755929;
    // t(0.975, 7) = 2.365 (NIST e-Handbook 1.3.6.7.2) → half-width 1.7878.
    const s = summarizeSample([2, 4, 4, 4, 5, 5, 7, 9]);
    expect(s.n).toBe(8);
    expect(s.mean).toBe(5);
    expect(s.sd).toBeCloseTo(Math.sqrt(32 / 7), 12);
    expect(s.se).toBeCloseTo(0.7559289460, 9);
    expect(s.cv).toBeCloseTo(Math.sqrt(32 / 7) / 5, 12);
    expect(s.ci[0]).toBeCloseTo(5 - 1.7878, 3);
    expect(s.ci[1]).toBeCloseTo(5 + 1.7878, 3);
  });

  it('agrees with simple-statistics (mean, sample SD) on a field-like sample', () => {
    const lengths = [71.5, 84, 77, 92.5, 66, 80.5, 88, 74, 79.5, 83];
    const s = summarizeSample(lengths, 0.9);
    expect(s.mean).toBeCloseTo(ss.mean(lengths), 12);
    expect(s.sd).toBeCloseTo(ss.sampleStandardDeviation(lengths), 12);
    // t(0.95, 9) = 1.833 (NIST e-Handbook 1.3.6.7.2)
    expect(s.ci[1] - s.mean).toBeCloseTo((1.833 * s.sd) / Math.sqrt(10), 2);
  });

  it('mean 0 gives cv null, not NaN', () => {
    expect(summarizeSample([-1, 1]).cv).toBeNull();
  });

  it.each([
    [[], 'empty'],
    [[5], 'too_few_points'],
    [[1, NaN], 'not_finite'],
    [[1, Infinity], 'not_finite'],
  ])('bad input %j → %s', (values, code) => {
    expect(codeOf(() => summarizeSample(values as number[]))).toBe(code);
  });

  it('bad level → bad_level', () => {
    expect(codeOf(() => summarizeSample([1, 2, 3], 95))).toBe('bad_level');
  });
});
