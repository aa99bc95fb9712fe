import { describe, expect, it } from 'vitest';
import { DEMO_RULE, USUAL_SAMPLE_SIZE, estimateBiomass, fitCalibration, interval, predict } from '../../shared/calc';
import { at } from '../helpers/lists';
import { readDemo } from './demo-data';
import { codeOf } from './prng';

const rye = fitCalibration(readDemo('cereal-rye').rows, 'power');
const T = DEMO_RULE.thresholdKgHa;
const rel = (a: number, b: number) => Math.abs(a - b) / Math.abs(b);

/*
 * A power calibration small enough to work by hand (invented): y = 2·x^1.5 times e^(+0.1), e^(−0.1),
 * e^(+0.1), e^(−0.1) at x = 1, 2, 4, 8. With L = ln 2 and k = log₂ x = 0, 1, 2, 3 the fit is a straight
 * line of ln y on k·L:
 *   ln y = ln 2 + 1.5·L·k + e_k, e = (+0.1, −0.1, +0.1, −0.1); k̄ = 1.5, Skk = 2.25 + 0.25 + 0.25 + 2.25 = 5
 *   Σ(k − 1.5)·e = −0.15 + 0.05 + 0.05 − 0.15 = −0.2, so the slope in k moves by −0.2/5 = −0.04 and the
 *   mean of e is 0: fitted η(k) = ln 2 + 1.5·L·k − 0.04·(k − 1.5); b = 1.5 − 0.04/L.
 *   residuals e_k + 0.04·(k − 1.5): +0.04, −0.12, +0.12, −0.04; SSE = 0.0016 + 0.0144 + 0.0144 + 0.0016
 *   = 0.032; df = 2; s² = 0.016.
 *   Smearing factor (Duan 1983) CF = mean(exp(residual)) = (cosh 0.04 + cosh 0.12)/2.
 *   Leverage at k: q(k) = 1/4 + (k − 1.5)²/5.
 * t quantiles with 1 and 2 degrees of freedom from their closed forms: t(p, 1) = tan(π(p − ½)),
 * t(p, 2) = (2p − 1)/√(2p(1 − p)).
 */
const HAND = [1, 2, 4, 8].map((x, i) => ({ x, y: 2 * x ** 1.5 * Math.exp(i % 2 ? -0.1 : 0.1) }));
const hand = fitCalibration(HAND, 'power');
const L = Math.LN2;
const CF = (Math.cosh(0.04) + Math.cosh(0.12)) / 2;
const S2 = 0.016;
const etaAt = (x: number) => {
  const k = Math.log(x) / L;
  return Math.log(2) + 1.5 * L * k - 0.04 * (k - 1.5);
};
const qAt = (x: number) => 0.25 + (Math.log(x) / L - 1.5) ** 2 / 5;
const t2 = (p: number) => (2 * p - 1) / Math.sqrt(2 * p * (1 - p));

describe('the hand-worked power calibration', () => {
  it('coefficients, s² and the smearing factor', () => {
    expect(hand.coefficients).toHaveLength(2);
    expect(rel(at(hand.coefficients, 1, 'slope'), 1.5 - 0.04 / L)).toBeLessThan(1e-12);
    expect(rel(hand.residualStdError ** 2, S2)).toBeLessThan(1e-12);
    expect(rel(hand.biasCorrection, CF)).toBeLessThan(1e-12);
  });

  it('at x = 4 (k = 2): point, 95 % confidence interval (smeared) and prediction interval (not smeared)', () => {
    // η(4) = ln 2 + 3L − 0.02 = ln 16 − 0.02; q = 0.25 + 0.05 = 0.3; t(0.975, 2) = 0.95/√0.04875
    const eta = Math.log(16) - 0.02;
    const t = 0.95 / Math.sqrt(0.04875);
    expect(rel(predict(hand, 4), 16 * Math.exp(-0.02) * CF)).toBeLessThan(1e-12);
    const ci = interval(hand, 4, { kind: 'confidence', level: 0.95 });
    expect(rel(ci[0], CF * Math.exp(eta - t * Math.sqrt(S2 * 0.3)))).toBeLessThan(1e-12);
    expect(rel(ci[1], CF * Math.exp(eta + t * Math.sqrt(S2 * 0.3)))).toBeLessThan(1e-12);
    const pi = interval(hand, 4, { kind: 'prediction', level: 0.95 });
    expect(rel(pi[0], Math.exp(eta - t * Math.sqrt(S2 * 1.3)))).toBeLessThan(1e-12);
    expect(rel(pi[1], Math.exp(eta + t * Math.sqrt(S2 * 1.3)))).toBeLessThan(1e-12);
  });
});

describe('estimateBiomass', () => {
  it('three plants 3, 4, 5 cm on the hand calibration, threshold 10: every figure by hand', () => {
    // n = 3, mean 4, sd = √((1 + 0 + 1)/2) = 1.
    // biomass = CF·exp(η(4)) = 16·e^(−0.02)·CF = 15.7488…
    // 90 % prediction interval at 4: t(0.95, 2) = 0.9/√0.095 = 2.9199856; exp(η(4) ± t·√(0.016·1.3)).
    // sampling range: 4 ± t(0.95, 2)·1/√3 = 4 ± 1.6858…, through the curve CF·exp(η(x)).
    // threshold length: CF·exp(η(x)) = 10 → ln 2 + 1.5·L·k − 0.04·(k − 1.5) = ln(10/CF)
    //   → k = (ln(10/CF) − ln 2 − 0.06)/(1.5·L − 0.04), x = 2^k = 2.9199…
    // more plants (old rule): smallest m with t(0.95, m − 1)/√m < 4 − 2.9199 = 1.0801. From the NIST
    //   e-Handbook t table: m = 4, 2.353/2 = 1.1765 (no); m = 5, 2.132/√5 = 0.9535 (yes) → 5 − 3 = 2 more.
    const e = estimateBiomass(hand, [3, 4, 5], { thresholdKgHa: 10, level: 0.9 });
    const biomass = 16 * Math.exp(-0.02) * CF;
    const eta = Math.log(16) - 0.02;
    const t = 0.9 / Math.sqrt(0.095);
    expect(e.n).toBe(3);
    expect(e.meanLengthCm).toBe(4);
    expect(rel(e.sdLengthCm as number, 1)).toBeLessThan(1e-14);
    expect(rel(e.biomassKgHa, biomass)).toBeLessThan(1e-12);
    expect(rel(e.interval[0], Math.exp(eta - t * Math.sqrt(S2 * 1.3)))).toBeLessThan(1e-12);
    expect(rel(e.interval[1], Math.exp(eta + t * Math.sqrt(S2 * 1.3)))).toBeLessThan(1e-12);
    const half = t / Math.sqrt(3);
    const curve = (x: number) => CF * Math.exp(etaAt(x));
    expect(e.samplingRange).not.toBeNull();
    const [sLo, sHi] = e.samplingRange!;
    expect(rel(sLo, curve(4 - half))).toBeLessThan(1e-12);
    expect(rel(sHi, curve(4 + half))).toBeLessThan(1e-12);
    const k = (Math.log(10 / CF) - Math.log(2) - 0.06) / (1.5 * L - 0.04);
    expect(rel(e.lengthForThresholdCm as number, 2 ** k)).toBeLessThan(1e-12);
    expect(e.meetsThreshold).toBe(true);
    expect(e.morePlantsSuggested).toBe(2);
    expect(e.note).toContain('about 2 more plants would likely settle it');
    expect(qAt(4)).toBeCloseTo(0.3, 14); // the leverage used above
    expect(t2(0.95)).toBeCloseTo(t, 14);
  });

  it('the verdict is the point estimate against the threshold, even when the interval spans it', () => {
    // Threshold length 2.9199 cm (above): two plants at 3.2 cm meet, at 2.7 cm do not; the 90 %
    // prediction interval at 3.2 cm reaches below 10 (exp(η(3.2) − 2.92·√(0.016·(1 + q))) < 10).
    const up = estimateBiomass(hand, [3.2, 3.2], { thresholdKgHa: 10 });
    expect(up.meetsThreshold).toBe(true);
    expect(up.interval[0]).toBeLessThan(10);
    expect(estimateBiomass(hand, [2.7, 2.7], { thresholdKgHa: 10 }).meetsThreshold).toBe(false);
  });

  it('ten clearly tall plants on the demo rye: meets, settled, the note says so', () => {
    const e = estimateBiomass(rye, [95, 102, 99, 97, 104, 100, 96, 101, 98, 103], { thresholdKgHa: T });
    expect(e.meanLengthCm).toBeCloseTo(99.5, 12);
    expect(e.meetsThreshold).toBe(true);
    expect(e.morePlantsSuggested).toBe(0);
    expect(e.note).toMatch(/meets the 4,500 lb\/ac threshold/);
    expect(e.note).toMatch(/lies above the threshold/);
    expect(e.note).not.toMatch(/usual sample/);
  });

  it('works with one plant: no sampling range, said in the note', () => {
    const e = estimateBiomass(rye, [80], { thresholdKgHa: T });
    expect(e.n).toBe(1);
    expect(e.samplingRange).toBeNull();
    expect(e.sdLengthCm).toBeNull();
    expect(e.morePlantsSuggested).toBeNull();
    expect(e.interval[0]).toBeLessThan(e.biomassKgHa);
    expect(e.note).toMatch(/one plant/i);
    expect(USUAL_SAMPLE_SIZE).toBe(10);
  });

  it('two identical lengths: the spread is unknown, never "settled"', () => {
    const e = estimateBiomass(rye, [82, 82], { thresholdKgHa: T });
    expect(e.morePlantsSuggested).toBeNull();
    expect(e.note).toMatch(/spread between plants is unknown/);
    expect(e.note).not.toMatch(/would likely not change/);
  });

  it('flags extrapolation outside the calibrated lengths', () => {
    const e = estimateBiomass(rye, [150, 160, 155], { thresholdKgHa: T });
    expect(e.extrapolated).toBe(true);
    expect(e.note).toMatch(/extrapolation/);
    expect(estimateBiomass(rye, [50, 60], { thresholdKgHa: T }).extrapolated).toBe(false);
  });

  it('metric note on request', () => {
    const e = estimateBiomass(rye, [80, 82], { thresholdKgHa: T, units: 'metric' });
    expect(e.note).toMatch(/kg\/ha/);
    expect(e.note).toMatch(/cm/);
  });

  it('a linear calibration never reports negative biomass', () => {
    const lin = fitCalibration([10, 20, 30, 40, 50].map((x) => ({ x, y: 100 * x - 1500 + (x % 20 ? 30 : -30) })), 'linear');
    const e = estimateBiomass(lin, [11, 12], { thresholdKgHa: 1000 });
    expect(e.biomassKgHa).toBeGreaterThanOrEqual(0);
    expect(e.interval[0]).toBeGreaterThanOrEqual(0);
    expect((e.samplingRange as number[])[0]).toBeGreaterThanOrEqual(0);
  });

  it.each([
    ['no lengths', [], 'empty'],
    ['NaN length', [80, NaN], 'not_finite'],
    ['infinite length', [Infinity], 'not_finite'],
    ['zero length', [80, 0], 'non_positive'],
    ['negative length', [-3], 'non_positive'],
  ])('%s → %s', (_n, lengths, code) => {
    expect(codeOf(() => estimateBiomass(rye, lengths as number[], { thresholdKgHa: T }))).toBe(code);
  });

  it('bad threshold and level are typed errors', () => {
    expect(codeOf(() => estimateBiomass(rye, [80], { thresholdKgHa: NaN }))).toBe('not_finite');
    expect(codeOf(() => estimateBiomass(rye, [80], { thresholdKgHa: 0 }))).toBe('non_positive');
    expect(codeOf(() => estimateBiomass(rye, [80], { thresholdKgHa: T, level: 90 }))).toBe('bad_level');
  });
});
