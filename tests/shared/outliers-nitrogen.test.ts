import { describe, expect, it } from 'vitest';
import { outlierIndexes, robustZ, shootNitrogen } from '../../shared/calc';
import * as flags from '../../shared/registry/walk-flags';
import { codeOf } from './prng';

describe('one outlier rule for the phone and the office', () => {
  it('the office module calls the estimation core function, not a copy', () => {
    expect(flags.robustZ).toBe(robustZ);
    expect(flags.outlierIndexes).toBe(outlierIndexes);
    expect(flags.OUTLIER_Z).toBe(3.5);
    expect(flags.OUTLIER_MIN_N).toBe(4);
  });

  it('modified z-score 0.6745·|x − median|/MAD above 3.5, from 4 plants on (Iglewicz and Hoaglin, 1993)', () => {
    // 80 82 84 86 120: median 84, deviations 4 2 0 2 36 → MAD 2; M(120) = 0.6745·36/2 = 12.14, M(80) = 1.349.
    expect(outlierIndexes([80, 82, 84, 86, 120])).toEqual([4]);
    expect(robustZ([80, 82, 84, 86, 120])[4]).toBeCloseTo((0.6745 * 36) / 2, 2);
    // 3 plants: too few to call one odd.
    expect(outlierIndexes([80, 82, 400])).toEqual([]);
    // 80 82 84 86 93.8: M(93.8) = 0.6745·9.8/2 = 3.305, above 3 but not above 3.5: not an outlier.
    expect(outlierIndexes([80, 82, 84, 86, 93.8])).toEqual([]);
  });
});

describe('nitrogen in the shoots', () => {
  it('biomass × tissue N %, interval scaled alike (by hand)', () => {
    // 5,000 kg/ha at 2.4 % N: 5000·0.024 = 120 kg N/ha; interval 3,600–7,000 → 86.4–168.
    const n = shootNitrogen(5000, 2.4, [3600, 7000]);
    expect(n.kgNPerHa).toBeCloseTo(120, 10);
    expect(n.interval?.[0]).toBeCloseTo(86.4, 10);
    expect(n.interval?.[1]).toBeCloseTo(168, 10);
    expect(shootNitrogen(5000, 2.4).interval).toBeNull();
  });

  it('implausible or missing values are typed errors', () => {
    expect(codeOf(() => shootNitrogen(5000, 24))).toBe('bad_option');
    expect(codeOf(() => shootNitrogen(5000, -1))).toBe('negative');
    expect(codeOf(() => shootNitrogen(NaN, 2))).toBe('not_finite');
    expect(codeOf(() => shootNitrogen(5000, 2, [7000, 3600]))).toBe('bad_option');
  });
});
