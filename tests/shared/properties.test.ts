import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
  MODELS, curveRange, fitCalibration, lengthForBiomass, lookupTable, monotoneDomain, predict, interval, type Fit, type ModelKind,
} from '../../shared/calc';
import { powerPoints } from './prng';

// Random calibration-like data sets: power law with random coefficient, exponent and scatter.
const arbFit = fc
  .record({
    seed: fc.integer({ min: 1, max: 1_000_000 }),
    n: fc.integer({ min: 6, max: 80 }),
    a: fc.double({ min: 0.5, max: 20, noNaN: true }),
    b: fc.double({ min: 1.1, max: 2.2, noNaN: true }),
    sigma: fc.double({ min: 0.05, max: 0.35, noNaN: true }),
    model: fc.constantFrom(...MODELS),
  })
  .map(({ seed, n, a, b, sigma, model }) => fitCalibration(powerPoints(n, seed, a, b, sigma), model as ModelKind));

describe('properties', () => {
  it('predict(fit, lengthForBiomass(fit, y)) ≈ y for y the curve reaches in range', () => {
    fc.assert(
      fc.property(arbFit, fc.double({ min: 0, max: 1, noNaN: true }), (fit: Fit, frac) => {
        const dom = monotoneDomain(fit);
        const lo = Math.max(dom.lo, fit.xRange[0]);
        const hi = Math.min(dom.hi, fit.xRange[1]);
        if (!(lo < hi)) return true;
        const [ylo, yhi] = curveRange(fit, lo, hi);
        const y = ylo + frac * (yhi - ylo);
        const r = lengthForBiomass(fit, y);
        if (!r.ok) return false;
        return Math.abs(predict(fit, r.x) - y) <= 1e-9 * Math.max(1, Math.abs(y));
      }),
      { numRuns: 300 },
    );
  });

  it('rising curves give rising lookup tables', () => {
    fc.assert(
      fc.property(arbFit, fc.constantFrom<'in' | 'cm'>('in', 'cm'), (fit: Fit, unit) => {
        const dom = monotoneDomain(fit);
        if (!dom.increasing || dom.lo > fit.xRange[0] || dom.hi < fit.xRange[1]) return true; // not monotone over the range
        const rows = lookupTable(fit, { unit, step: unit === 'in' ? 1 : 2 });
        return rows.every((r, i) => {
          const before = rows[i - 1]; // none for the first row
          return before === undefined || r.biomassKgHa >= before.biomassKgHa;
        });
      }),
      { numRuns: 200 },
    );
  });

  it('a JSON.stringify/parse’d Fit predicts identically', () => {
    fc.assert(
      fc.property(arbFit, fc.double({ min: 1, max: 200, noNaN: true }), (fit: Fit, x) => {
        const g = JSON.parse(JSON.stringify(fit)) as Fit;
        return (
          predict(g, x) === predict(fit, x) &&
          interval(g, x, { kind: 'prediction' }).every((v, i) => v === interval(fit, x, { kind: 'prediction' })[i])
        );
      }),
      { numRuns: 200 },
    );
  });

  it('intervals contain the prediction, and prediction intervals contain confidence intervals', () => {
    fc.assert(
      fc.property(arbFit, fc.double({ min: 5, max: 160, noNaN: true }), (fit: Fit, x) => {
        const y = predict(fit, x);
        const pi = interval(fit, x, { kind: 'prediction' });
        const ci = interval(fit, x, { kind: 'confidence' });
        return pi[0] <= ci[0] && ci[0] <= y && y <= ci[1] && ci[1] <= pi[1];
      }),
      { numRuns: 300 },
    );
  });
});

describe('property sanity', () => {
  it('generator produces all four models', () => {
    const models = new Set(fc.sample(arbFit, 60).map((f) => f.model));
    expect(models.size).toBe(4);
  });
});
