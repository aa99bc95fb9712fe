import { describe, expect, it } from 'vitest';
import {
  DEMO_RULE, USUAL_SAMPLE_SIZE, estimateBiomass, fitCalibration, interval, lengthForBiomass, predict, tCritical,
} from '../../shared/calc';
import { readDemo } from './demo-data';
import { codeOf } from './prng';

const rye = fitCalibration(readDemo('cereal-rye').rows, 'power');
const T = DEMO_RULE.thresholdKgHa;
const LT = (() => {
  const r = lengthForBiomass(rye, T);
  if (!r.ok) throw new Error('demo rye calibration should reach the threshold');
  return r.x;
})();

describe('estimateBiomass', () => {
  it('ten clearly tall plants: meets the threshold, settled, numbers tie out', () => {
    const lengths = [95, 102, 99, 97, 104, 100, 96, 101, 98, 103];
    const e = estimateBiomass(rye, lengths, { thresholdKgHa: T });
    expect(e.n).toBe(10);
    expect(e.meanLengthCm).toBeCloseTo(99.5, 12);
    expect(e.biomassKgHa).toBe(predict(rye, 99.5));
    expect(e.interval).toEqual(interval(rye, 99.5, { kind: 'prediction', level: 0.9 }));
    expect(e.meetsThreshold).toBe(true);
    expect(e.extrapolated).toBe(false);
    expect(e.morePlantsSuggested).toBe(0);
    // Sampling range by hand: mean ± t(0.95, 9)·sd/√n through the curve.
    const sd = e.sdLengthCm as number;
    const half = (tCritical(0.9, 9) * sd) / Math.sqrt(10);
    expect(e.samplingRange).toEqual([predict(rye, 99.5 - half), predict(rye, 99.5 + half)]);
    expect(e.note).toMatch(/meets the 4,500 lb\/ac threshold/);
    expect(e.note).toMatch(/lies above the threshold/);
    expect(e.note).not.toMatch(/usual sample/);
  });

  it('the verdict is the point estimate against the threshold, even when the interval spans it', () => {
    const justAbove = estimateBiomass(rye, [LT + 0.5, LT + 0.5], { thresholdKgHa: T });
    expect(justAbove.meetsThreshold).toBe(true);
    expect(justAbove.interval[0]).toBeLessThan(T);
    const justBelow = estimateBiomass(rye, [LT - 0.5, LT - 0.5], { thresholdKgHa: T });
    expect(justBelow.meetsThreshold).toBe(false);
  });

  it('borderline: suggests how many more plants, and that many would indeed settle it', () => {
    const lengths = [-9, 14, -3, 12, 6, 1, 10, -7].map((d) => LT + d); // mean LT + 3, sd ≈ 8.8
    const e = estimateBiomass(rye, lengths, { thresholdKgHa: T });
    const [lo, hi] = e.samplingRange as [number, number];
    expect(lo).toBeLessThan(T);
    expect(hi).toBeGreaterThan(T);
    const k = e.morePlantsSuggested as number;
    expect(k).toBeGreaterThan(0);
    // With n + k plants of the same mean and spread the t-interval of the mean excludes the threshold
    // length; with n + k − 1 it does not.
    const sd = e.sdLengthCm as number;
    const d = Math.abs(e.meanLengthCm - (e.lengthForThresholdCm as number));
    const settles = (m: number) => (tCritical(0.9, m - 1) * sd) / Math.sqrt(m) < d;
    expect(settles(e.n + k)).toBe(true);
    expect(settles(e.n + k - 1)).toBe(false);
    expect(e.note).toContain(`about ${k} more plant`);
    expect(e.note).toMatch(/usual sample is 10 plants/);
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
