import { describe, expect, it } from 'vitest';
import {
  DEMO_RULE, DEMO_VERDICT_RULE, decideVerdict, fitCalibration, lengthForBiomass, sampleSizeForMean, tCritical, verdictSnapshot,
  type DecisionBasis, type VerdictRule,
} from '../../shared/calc';
import { at } from '../helpers/lists';
import { readDemo } from './demo-data';
import { codeOf, mulberry32, normal } from './prng';

const rye = fitCalibration(readDemo('cereal-rye').rows, 'power');
const T = DEMO_RULE.thresholdKgHa;
const LT = (() => {
  const r = lengthForBiomass(rye, T);
  if (!r.ok) throw new Error('demo rye calibration should reach the threshold');
  return r.x;
})();
const rule = (decisionBasis: DecisionBasis, extra: Partial<VerdictRule> = {}): VerdictRule => ({
  thresholdKgHa: T, decisionBasis, confidence: 0.9, minPlants: 10, ...extra,
});
const codes = (v: { reasons: { code: string }[] }) => v.reasons.map((r) => r.code);
/** Ten lengths around `mean` with a spread of about `sd` (symmetric, so the mean is exact). */
const ten = (mean: number, sd: number) => [-1.5, -1.1, -0.7, -0.4, -0.1, 0.1, 0.4, 0.7, 1.1, 1.5].map((z) => mean + z * sd);

// A tight calibration (invented, seeded: y = 0.8·x^1.9 with 5 % log scatter, 40 points), on which
// more plants can settle a verdict; the demo rye calibration scatters too much for that near the threshold.
const tight = (() => {
  const rand = mulberry32(404);
  return fitCalibration(
    Array.from({ length: 40 }, (_, i) => {
      const x = 30 + 2.5 * i;
      return { x, y: 0.8 * x ** 1.9 * Math.exp(0.05 * normal(rand)) };
    }),
    'power',
  );
})();
const tightLT = (() => {
  const r = lengthForBiomass(tight, 3000);
  if (!r.ok) throw new Error('tight calibration should reach 3000');
  return r.x;
})();

describe('decision bases', () => {
  it('the demo rule is point_with_borderline at 90 % with 10 plants minimum', () => {
    expect(DEMO_VERDICT_RULE).toEqual({ decisionBasis: 'point_with_borderline', confidence: 0.9, minPlants: 10 });
  });

  it('point: the point estimate decides, the interval is only a caution', () => {
    const v = decideVerdict(rye, ten(LT + 2, 5), rule('point'));
    expect(v.verdict).toBe('meets');
    expect(codes(v)).toEqual(['point_meets']);
    expect(v.cautions.map((c) => c.code)).toContain('interval_spans_threshold');
    expect(decideVerdict(rye, ten(LT - 2, 5), rule('point')).verdict).toBe('below');
  });

  it('point_with_borderline: a combined interval spanning the threshold is borderline', () => {
    // The demo walk: 10 plants averaging 32.2 in (81.788 cm) on the demo rye.
    const v = decideVerdict(rye, ten(32.2 * 2.54, 4), rule('point_with_borderline'));
    expect(v.biomassKgHa).toBeGreaterThan(T);
    expect(v.verdict).toBe('borderline');
    expect(codes(v)).toEqual(['point_meets', 'interval_spans_threshold']);
    const [lo, hi] = v.combined.interval as [number, number];
    expect(lo).toBeLessThan(T);
    expect(hi).toBeGreaterThan(T);
    // The calibration's own scatter spans the threshold here: no number of plants settles it.
    expect(v.morePlants).toEqual({ kind: 'calibration_spans_threshold' });
  });

  it('point_with_borderline: clear of the threshold gives meets or below', () => {
    const up = decideVerdict(rye, ten(120, 5), rule('point_with_borderline'));
    expect(up.verdict).toBe('meets');
    expect(codes(up)).toEqual(['point_meets', 'interval_above_threshold']);
    expect(up.morePlants).toBeNull();
    const down = decideVerdict(rye, ten(45, 5), rule('point_with_borderline'));
    expect(down.verdict).toBe('below');
    expect(codes(down)).toEqual(['point_below', 'interval_below_threshold']);
  });

  it('lower_bound: meets only when the one-sided lower bound clears the threshold', () => {
    const up = decideVerdict(rye, ten(120, 5), rule('lower_bound'));
    expect(up.verdict).toBe('meets');
    expect(up.reasons[0]).toMatchObject({ code: 'lower_bound_meets', thresholdKgHa: T, confidence: 0.9 });
    expect((up.reasons[0] as { lowerBoundKgHa: number }).lowerBoundKgHa).toBe(up.combined.lowerBound);
    const mid = decideVerdict(rye, ten(LT + 3, 5), rule('lower_bound'));
    expect(mid.verdict).toBe('borderline');
    expect(codes(mid)).toEqual(['lower_bound_below']);
    const down = decideVerdict(rye, ten(LT - 3, 5), rule('lower_bound'));
    expect(down.verdict).toBe('below');
    expect(codes(down)).toEqual(['lower_bound_below', 'point_below']);
  });

  it('the one-sided bound at 90 % is higher than the two-sided 90 % lower end (t(0.90) < t(0.95))', () => {
    const v = decideVerdict(rye, ten(100, 6), rule('lower_bound'));
    expect(v.combined.interval).not.toBeNull();
    expect(v.combined.lowerBound as number).toBeGreaterThan(v.combined.interval![0]);
  });
});

describe('small samples say so', () => {
  it.each(['point', 'lower_bound', 'point_with_borderline'] as const)('%s: fewer than the minimum plants is at best borderline', (basis) => {
    const v = decideVerdict(rye, [118, 122], rule(basis));
    expect(v.verdict).toBe('borderline');
    expect(v.reasons[0]).toEqual({ code: 'too_few_plants', n: 2, minPlants: 10 });
    expect(v.morePlants).toEqual({ kind: 'reach_minimum', more: 8, minPlants: 10 });
  });

  it('below stays below with few plants (too few plants never raises a verdict)', () => {
    const v = decideVerdict(rye, [40, 44], rule('point_with_borderline'));
    expect(v.verdict).toBe('below');
    expect(codes(v)[0]).toBe('too_few_plants');
  });

  it('zero spread is unknown spread: never settled, even with ten plants far above the threshold', () => {
    const v = decideVerdict(rye, Array(10).fill(120), rule('point_with_borderline'));
    expect(v.verdict).toBe('borderline');
    expect(codes(v)).toEqual(['point_meets', 'unknown_spread']);
    expect(v.morePlants).toEqual({ kind: 'spread_unknown', more: 1 });
    const lb = decideVerdict(rye, Array(10).fill(120), rule('lower_bound'));
    expect(lb.verdict).toBe('borderline');
    // Ten equal lengths whose sum is not exact in binary (10 × 81.28 cm = 32 in): still no spread.
    const dust = decideVerdict(rye, Array(10).fill(81.28), rule('point_with_borderline'));
    expect(codes(dust)).toContain('unknown_spread');
    expect(dust.verdict).toBe('borderline');
    // Two identical lengths: too few and unknown.
    const two = decideVerdict(rye, [82, 82], rule('point_with_borderline'));
    expect(two.verdict).toBe('borderline');
    expect(codes(two)).toEqual(['too_few_plants', 'point_meets', 'unknown_spread']);
  });

  it('the point basis notes an unknown spread as a caution', () => {
    const v = decideVerdict(rye, Array(10).fill(120), rule('point'));
    expect(v.verdict).toBe('meets');
    expect(v.cautions.map((c) => c.code)).toContain('unknown_spread');
  });

  it('extrapolation is a caution with the calibrated range', () => {
    const v = decideVerdict(rye, ten(rye.xRange[1] + 20, 3), rule('point_with_borderline'));
    expect(v.cautions).toContainEqual({ code: 'extrapolated', meanLengthCm: v.meanLengthCm, calibratedCm: rye.xRange });
  });
});

describe('"measure more plants" with stated power (NIST/SEMATECH e-Handbook 7.2.2.2)', () => {
  // Normal quantiles (standard values, quoted from memory; the t table's last row prints 1.645 and 1.282):
  const z95 = 1.6448536269514722; // z(0.95)
  const z90 = 1.2815515655446004; // z(0.90)
  const z80 = 0.8416212335729143; // z(0.80)

  it('the handbook formula worked by hand: σ = 9.1 cm, δ = 1.6 cm, α = 0.10 two-sided, power 80 %', () => {
    // N ≥ (z(1 − α/2) + z(1 − β))²·σ²/δ²
    //   z(0.95) + z(0.80) = 1.6448536 + 0.8416212 = 2.4864749;  squared 6.1825572
    //   σ²/δ² = 82.81/2.56 = 32.3476563
    //   N ≥ 6.1825572·32.3476563 = 199.9914 → 200 plants
    const factor = (z95 + z80) ** 2;
    expect(factor).toBeCloseTo(6.1825572, 6);
    expect(factor * (82.81 / 2.56)).toBeCloseTo(199.9914, 3);
    expect(sampleSizeForMean({ sd: 9.1, delta: 1.6, alpha: 0.1, sided: 'two' }).total).toBe(200);
  });

  it('one-sided, power 90 %: (z(0.90) + z(0.90))²·σ²/δ² = (2.5631031)²·(5/2)² = 6.5694976·6.25 = 41.06 → 42', () => {
    expect(sampleSizeForMean({ sd: 5, delta: 2, alpha: 0.1, power: 0.9, sided: 'one' }).total).toBe(42);
    expect((z90 + z90) ** 2 * 6.25).toBeCloseTo(41.0594, 3);
  });

  it("the issue's case: borderline, n = 10, sd 9.1 cm — the old rule's +80 against the formula's +190", () => {
    // The old rule asked for the smallest m with t(0.95, m − 1)·sd/√m < δ (the 90 % interval of the mean
    // just clear of the threshold length). With δ = 1.6 cm that is m = 90, so "+80".
    const sd = 9.1;
    const delta = 1.6;
    const oldOk = (m: number) => (tCritical(0.9, m - 1) * sd) / Math.sqrt(m) < delta;
    expect(oldOk(90) && !oldOk(89)).toBe(true);
    // The formula asks that the interval clear the threshold with an 80 % chance, not a coin toss:
    // its factor (1.645 + 0.842)² = 6.18 replaces t(0.95, 89)² = 1.662² = 2.76, so about 2.24 times the
    // plants: 200 in all, +190. The "about +193" is the same arithmetic with δ ≈ 1.59 cm
    // (N = 203); any δ from 1.595 to 1.6 cm gives the old +80.
    const n = sampleSizeForMean({ sd, delta, alpha: 0.1, sided: 'two' }).total as number;
    expect(n - 10).toBe(190);
    expect(sampleSizeForMean({ sd, delta: 1.59, alpha: 0.1, sided: 'two' }).total).toBe(203);
  });

  it('the calibration part plants cannot reduce: room = δ² − factor·v, none when not positive', () => {
    // v = 0.25 cm²: room = 2.56 − 6.1825572·0.25 = 1.0143607; N ≥ 6.1825572·82.81/1.0143607 = 504.7 → 505
    expect(sampleSizeForMean({ sd: 9.1, delta: 1.6, alpha: 0.1, sided: 'two', fixedVariance: 0.25 }).total).toBe(505);
    expect(sampleSizeForMean({ sd: 9.1, delta: 1.6, alpha: 0.1, sided: 'two', fixedVariance: 0.5 }).total).toBeNull();
  });

  it('a borderline walk on a tight calibration: measure more, and that many plants settle it', () => {
    const lengths = ten(tightLT + 7, 14);
    const v = decideVerdict(tight, lengths, { thresholdKgHa: 3000, decisionBasis: 'point_with_borderline', confidence: 0.9, minPlants: 10 }, { maxPlants: 100 });
    expect(v.verdict).toBe('borderline');
    expect(v.morePlants?.kind).toBe('measure_more');
    const adv = v.morePlants as { more: number; total: number; power: number; alpha: number; sided: string };
    expect(adv).toMatchObject({ power: 0.8, sided: 'two' });
    expect(adv.alpha).toBeCloseTo(0.1, 12);
    expect(adv.total).toBe(10 + adv.more);
    // With that many plants of the same mean and spread the combined interval is clear of the threshold.
    const more = decideVerdict(tight, Array.from({ length: adv.total }, (_, i) => at(lengths, i % lengths.length, 'length')), { thresholdKgHa: 3000, decisionBasis: 'point_with_borderline', confidence: 0.9, minPlants: 10 });
    expect(more.verdict).toBe('meets');
  });

  it('over the cap: walk again later', () => {
    const v = decideVerdict(tight, ten(tightLT + 5, 9), { thresholdKgHa: 3000, decisionBasis: 'point_with_borderline', confidence: 0.9, minPlants: 10 });
    expect(v.verdict).toBe('borderline');
    expect(v.morePlants).toMatchObject({ kind: 'walk_again', maxPlants: 40, power: 0.8 });
  });
});

describe('the stored snapshot', () => {
  it('keeps codes and SI numbers, survives JSON, and words come back the same', () => {
    const v = decideVerdict(rye, ten(LT + 3, 6), rule('point_with_borderline'));
    const snap = verdictSnapshot(v);
    expect(JSON.parse(JSON.stringify(snap))).toEqual(snap);
    expect(snap).toMatchObject({ verdict: 'borderline', decisionBasis: 'point_with_borderline', confidence: 0.9, minPlants: 10, thresholdKgHa: T });
    expect(snap.combinedInterval).toEqual(v.combined.interval);
    expect(snap.lowerBoundKgHa).toBe(v.combined.lowerBound);
    expect(JSON.stringify(snap)).not.toMatch(/lb\/ac|kg\/ha/); // no pre-rendered words
  });
});

describe('bad rules are typed errors', () => {
  it.each([
    ['unknown basis', { decisionBasis: 'median' }],
    ['confidence 90', { confidence: 90 }],
    ['no minimum', { minPlants: 0 }],
    ['fractional minimum', { minPlants: 2.5 }],
    ['no threshold', { thresholdKgHa: 0 }],
  ])('%s', (_n, extra) => {
    const c = codeOf(() => decideVerdict(rye, [80, 81], { ...rule('point'), ...(extra as object) }));
    expect(['bad_option', 'bad_level', 'non_positive']).toContain(c);
  });
});
