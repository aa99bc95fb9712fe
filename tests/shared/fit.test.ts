import * as ss from 'simple-statistics';
import { describe, expect, it } from 'vitest';
import {
  MODELS, compareModels, fitCalibration, interval, lengthForBiomass, predict, type Fit, type ModelKind,
} from '../../shared/calc';
import { at } from '../helpers/lists';
import { codeOf, powerPoints } from './prng';

const rel = (a: number, b: number) => Math.abs(a - b) / Math.abs(b);
/** Coefficient `i` of a fit (0 the intercept, 1 the slope…). */
const coef = (f: Fit, i: number) => at(f.coefficients, i, 'coefficient');
const pairsOf = (pts: { x: number; y: number }[]) => pts.map((p) => [p.x, p.y]);

// Our own small data set for hand checks (invented): x = 1..10, roughly y = 2x.
const HAND = [2.1, 3.9, 6.2, 7.8, 10.1, 12.2, 13.8, 16.1, 18.0, 19.9].map((y, i) => ({ x: i + 1, y }));

describe('linear fit: cross-check with simple-statistics and by hand', () => {
  const f = fitCalibration(HAND, 'linear');

  it('coefficients match simple-statistics linearRegression', () => {
    const lr = ss.linearRegression(pairsOf(HAND)); // general-purpose library: {m, b}
    expect(rel(coef(f, 0), lr.b)).toBeLessThan(1e-12);
    expect(rel(coef(f, 1), lr.m)).toBeLessThan(1e-12);
    expect(rel(f.rSquared, ss.rSquared(pairsOf(HAND), ss.linearRegressionLine(lr)))).toBeLessThan(1e-12);
  });

  it('95% prediction and confidence intervals at x0 = 7.5 by hand', () => {
    // By hand: x̄ = 5.5, Sxx = Σ(x−x̄)² = 82.5, s² = SSE/(n−2), t(0.975, 8) = 2.306 (NIST e-Handbook
    // 1.3.6.7.2, 3 decimals, hence the 3e-4 relative tolerance on the half-widths).
    const lr = ss.linearRegression(pairsOf(HAND));
    const sse = HAND.reduce((s, p) => s + (p.y - (lr.b + lr.m * p.x)) ** 2, 0);
    const s = Math.sqrt(sse / 8);
    const yhat = lr.b + lr.m * 7.5;
    const halfPI = 2.306 * s * Math.sqrt(1 + 1 / 10 + (7.5 - 5.5) ** 2 / 82.5);
    const halfCI = 2.306 * s * Math.sqrt(1 / 10 + (7.5 - 5.5) ** 2 / 82.5);
    const pi = interval(f, 7.5, { kind: 'prediction' });
    const ci = interval(f, 7.5, { kind: 'confidence', level: 0.95 });
    expect(predict(f, 7.5)).toBeCloseTo(yhat, 10);
    expect(rel((pi[1] - pi[0]) / 2, halfPI)).toBeLessThan(3e-4);
    expect(rel((ci[1] - ci[0]) / 2, halfCI)).toBeLessThan(3e-4);
    expect((pi[0] + pi[1]) / 2).toBeCloseTo(yhat, 10);
  });

  it('hand-worked example: 95 % and 90 % intervals at x = 3.5, every step written out', () => {
    // Invented data, n = 4: x 1 2 3 4, y 3 5 4 8.
    //   x̄ = 2.5, ȳ = 5; Sxx = 2.25 + 0.25 + 0.25 + 2.25 = 5;
    //   Sxy = (−1.5)(−2) + (−0.5)(0) + (0.5)(−1) + (1.5)(3) = 3 + 0 − 0.5 + 4.5 = 7;
    //   b = 7/5 = 1.4, a = 5 − 1.4·2.5 = 1.5.
    //   fitted 2.9 4.3 5.7 7.1; residuals 0.1 0.7 −1.7 0.9; SSE = 0.01 + 0.49 + 2.89 + 0.81 = 4.2;
    //   df = 2, s² = 2.1.
    //   At x0 = 3.5: ŷ = 1.5 + 1.4·3.5 = 6.4; q = 1/4 + (3.5 − 2.5)²/5 = 0.45.
    //   t for df 2 in closed form, t = (2p − 1)/√(2p(1 − p)):
    //     95 % two-sided, p = 0.975: 0.95/√0.04875 = 4.302652729749464
    //     90 % two-sided, p = 0.95:  0.90/√0.095   = 2.919985580353725
    //   prediction half-width t·√(s²(1 + q)) = t·√3.045; confidence half-width t·√(s²q) = t·√0.945.
    const g = fitCalibration([{ x: 1, y: 3 }, { x: 2, y: 5 }, { x: 3, y: 4 }, { x: 4, y: 8 }], 'linear');
    expect(rel(coef(g, 0), 1.5)).toBeLessThan(1e-12);
    expect(rel(coef(g, 1), 1.4)).toBeLessThan(1e-12);
    expect(rel(g.residualStdError ** 2, 2.1)).toBeLessThan(1e-12);
    const t95 = 0.95 / Math.sqrt(0.04875);
    const t90 = 0.9 / Math.sqrt(0.095);
    for (const [level, t] of [[0.95, t95], [0.9, t90]] as const) {
      const pi = interval(g, 3.5, { kind: 'prediction', level });
      const ci = interval(g, 3.5, { kind: 'confidence', level });
      expect(rel(pi[0], 6.4 - t * Math.sqrt(3.045))).toBeLessThan(1e-12);
      expect(rel(pi[1], 6.4 + t * Math.sqrt(3.045))).toBeLessThan(1e-12);
      expect(rel(ci[0], 6.4 - t * Math.sqrt(0.945))).toBeLessThan(1e-12);
      expect(rel(ci[1], 6.4 + t * Math.sqrt(0.945))).toBeLessThan(1e-12);
    }
  });
});

describe('log models', () => {
  const pts = powerPoints(40, 7);

  it('power = straight line through (ln x, ln y) (simple-statistics), smearing factor by hand', () => {
    const f = fitCalibration(pts, 'power');
    const logPairs = pts.map((p): [number, number] => [Math.log(p.x), Math.log(p.y)]);
    const lr = ss.linearRegression(logPairs);
    expect(rel(at(f.fittedScaleCoefficients, 0, 'log-scale intercept'), lr.b)).toBeLessThan(1e-10);
    expect(rel(coef(f, 0), Math.exp(lr.b))).toBeLessThan(1e-10);
    expect(rel(coef(f, 1), lr.m)).toBeLessThan(1e-10);
    // Duan (1983) smearing: mean of exp(log-scale residuals).
    const smear = ss.mean(logPairs.map(([lx, ly]) => Math.exp(ly - (lr.b + lr.m * lx))));
    expect(rel(f.biasCorrection, smear)).toBeLessThan(1e-12);
    expect(f.biasCorrectionMethod).toBe('smearing');
    expect(rel(predict(f, 50), Math.exp(lr.b) * 50 ** lr.m * smear)).toBeLessThan(1e-12);
  });

  it('exponential = straight line through (x, ln y)', () => {
    const f = fitCalibration(pts, 'exponential');
    const lr = ss.linearRegression(pts.map((p) => [p.x, Math.log(p.y)]));
    expect(rel(coef(f, 0), Math.exp(lr.b))).toBeLessThan(1e-10);
    expect(rel(coef(f, 1), lr.m)).toBeLessThan(1e-10);
  });

  it('prediction interval = exp of the log-scale interval (asymmetric), by hand', () => {
    // 10 points so df = 8 and t(0.975, 8) = 2.306 (NIST e-Handbook 1.3.6.7.2).
    const ten = powerPoints(10, 11);
    const f = fitCalibration(ten, 'power');
    const logPairs = ten.map((p): [number, number] => [Math.log(p.x), Math.log(p.y)]);
    const lx = logPairs.map(([v]) => v);
    const lr = ss.linearRegression(logPairs);
    const s = Math.sqrt(logPairs.reduce((acc, [v, w]) => acc + (w - lr.b - lr.m * v) ** 2, 0) / 8);
    const mx = ss.mean(lx);
    const sxx = lx.reduce((acc, v) => acc + (v - mx) ** 2, 0);
    const x0 = 60;
    const eta = lr.b + lr.m * Math.log(x0);
    const half = 2.306 * s * Math.sqrt(1 + 1 / 10 + (Math.log(x0) - mx) ** 2 / sxx);
    const [lo, hi] = interval(f, x0, { kind: 'prediction' });
    expect(rel(Math.log(lo), eta - half)).toBeLessThan(1e-3);
    expect(rel(Math.log(hi), eta + half)).toBeLessThan(1e-3);
    expect(hi - predict(f, x0)).toBeGreaterThan(predict(f, x0) - lo); // asymmetric: longer upper tail
    // The confidence interval of the mean carries the smearing factor.
    const [clo, chi] = interval(f, x0, { kind: 'confidence' });
    expect(clo).toBeLessThan(predict(f, x0));
    expect(chi).toBeGreaterThan(predict(f, x0));
  });
});

describe('quadratic', () => {
  it('recovers an exact quadratic', () => {
    const f = fitCalibration([0, 1, 2, 3, 4, 5].map((x) => ({ x, y: 1 + 2 * x + 3 * x * x })), 'quadratic');
    expect(f.coefficients[0]).toBeCloseTo(1, 10);
    expect(f.coefficients[1]).toBeCloseTo(2, 10);
    expect(f.coefficients[2]).toBeCloseTo(3, 10);
    expect(f.residualStdError).toBeLessThan(1e-9);
  });
});

describe('leave-one-out RMSE (closed form) equals refitting without each point', () => {
  const pts = powerPoints(25, 3);
  it.each(MODELS.map((m) => [m]))('%s', (model) => {
    const f = fitCalibration(pts, model as ModelKind);
    let ssq = 0;
    for (const [i, p] of pts.entries()) {
      // A full refit without point i, its own smearing factor included (log models).
      const g = fitCalibration(pts.filter((_, j) => j !== i), model as ModelKind);
      ssq += (p.y - predict(g, p.x)) ** 2;
    }
    expect(rel(f.looRmse as number, Math.sqrt(ssq / pts.length))).toBeLessThan(1e-9);
  });

  it('also at n = 600 (the series path of the smearing sums), for both log models', () => {
    const many = powerPoints(600, 7);
    for (const model of ['power', 'exponential'] as const) {
      const f = fitCalibration(many, model);
      let ssq = 0;
      for (const [i, p] of many.entries()) {
        const g = fitCalibration(many.filter((_, j) => j !== i), model);
        ssq += (p.y - predict(g, p.x)) ** 2;
      }
      expect(rel(f.looRmse as number, Math.sqrt(ssq / many.length))).toBeLessThan(1e-9);
    }
  });

  it('also at small n, where reusing the full-fit factor was off by several per cent', () => {
    const few = powerPoints(6, 21, 3.4, 1.65, 0.45);
    const f = fitCalibration(few, 'power');
    let ssq = 0;
    for (const [i, p] of few.entries()) {
      const g = fitCalibration(few.filter((_, j) => j !== i), 'power');
      ssq += (p.y - predict(g, p.x)) ** 2;
    }
    expect(rel(f.looRmse as number, Math.sqrt(ssq / few.length))).toBeLessThan(1e-9);
  });
});

describe('quadratic predictions in the centred basis', () => {
  it('far from x = 0 the prediction keeps its digits', () => {
    // Exact data y = 5 + 3·d + 2·d², d = x − 10⁶, at d = −3 … 3. By hand at x = 10⁶ + 0.5:
    // 5 + 1.5 + 2·0.25 = 7. The raw form a + b·x + c·x² has a ≈ 2·10¹², so evaluating it cancels
    // about 12 of the 16 digits; the centred form does not.
    const X0 = 1e6;
    const f = fitCalibration([-3, -2, -1, 0, 1, 2, 3].map((d) => ({ x: X0 + d, y: 5 + 3 * d + 2 * d * d })), 'quadratic');
    expect(rel(predict(f, X0 + 0.5), 7)).toBeLessThan(1e-10);
    expect(rel(predict(f, X0 - 2.25), 5 - 6.75 + 2 * 5.0625)).toBeLessThan(1e-10);
  });

  it('a quadratic fit stored before the centred coefficients existed still predicts (raw form)', () => {
    const f = fitCalibration([0, 1, 2, 3, 4, 5].map((x) => ({ x, y: 1 + 2 * x + 3 * x * x })), 'quadratic');
    const old = { ...f } as Partial<Fit>;
    delete old.centredCoefficients;
    expect(predict(old as Fit, 2.5)).toBeCloseTo(1 + 5 + 3 * 6.25, 9);
  });
});

describe('a Fit is plain JSON', () => {
  it.each(MODELS.map((m) => [m]))('%s: JSON round trip predicts and intervals identically', (model) => {
    const f = fitCalibration(powerPoints(30, 5), model as ModelKind);
    const g = JSON.parse(JSON.stringify(f)) as Fit;
    expect(g).toEqual(f);
    for (const x of [12, 40.5, 77.7, 139]) {
      expect(predict(g, x)).toBe(predict(f, x));
      expect(interval(g, x, { kind: 'prediction', level: 0.9 })).toEqual(interval(f, x, { kind: 'prediction', level: 0.9 }));
      expect(interval(g, x, { kind: 'confidence' })).toEqual(interval(f, x, { kind: 'confidence' }));
    }
  });

  it('reports the documented shape', () => {
    const f = fitCalibration(powerPoints(30, 5), 'power');
    expect(Object.keys(f).sort()).toEqual(
      [
        'basis', 'biasCorrection', 'biasCorrectionMethod', 'centredCoefficients', 'coefficients', 'covUnscaled', 'df', 'equation',
        'fittedScaleCoefficients', 'looRmse', 'model', 'n', 'rSquared', 'residualStdError', 'schema',
        'standardErrors', 'xRange', 'yRange',
      ].sort(),
    );
    expect(f.equation).toMatch(/^y = [\d.]+ · x\^[\d.]+ × [\d.]+$/);
  });
});

describe('bad input gets typed errors', () => {
  const ok = [1, 2, 3, 4, 5].map((x) => ({ x, y: 2 * x + 1 }));
  it.each([
    ['no points', [], 'linear', 'empty'],
    ['NaN y', [{ x: 1, y: NaN }, ...ok], 'linear', 'not_finite'],
    ['infinite x', [{ x: Infinity, y: 1 }, ...ok], 'linear', 'not_finite'],
    ['not a point', [null, ...ok], 'linear', 'not_finite'],
    ['2 points, linear', ok.slice(0, 2), 'linear', 'too_few_points'],
    ['3 points, quadratic', ok.slice(0, 3), 'quadratic', 'too_few_points'],
    ['all x equal', [1, 2, 3].map((y) => ({ x: 4, y })), 'linear', 'x_all_equal'],
    ['two distinct x, quadratic', [1, 1, 2, 2].map((x, i) => ({ x, y: i })), 'quadratic', 'too_few_distinct_x'],
    ['zero biomass, power', [{ x: 6, y: 0 }, ...ok], 'power', 'non_positive_y'],
    ['negative biomass, exponential', [{ x: 6, y: -3 }, ...ok], 'exponential', 'non_positive_y'],
    ['zero length, power', [{ x: 0, y: 1 }, ...ok], 'power', 'non_positive_x'],
    ['unknown model', ok, 'cubic', 'bad_model'],
    ['exponential whose a overflows', [0, 20, 40, 60, 80, 100].map((d) => ({ x: 7000 + d, y: 10 ** (300 - 3.1 * d) })), 'exponential', 'bad_fit'],
  ])('%s → %s', (_name, points, model, code) => {
    expect(codeOf(() => fitCalibration(points as never, model as ModelKind))).toBe(code);
  });

  const f = fitCalibration(powerPoints(20, 1), 'power');
  it.each([
    ['predict NaN', () => predict(f, NaN), 'not_finite'],
    ['predict at 0 on a power curve', () => predict(f, 0), 'non_positive'],
    ['malformed fit', () => predict({ model: 'power' } as never, 5), 'bad_fit'],
    ['fit with NaN coefficient', () => predict({ ...f, coefficients: [NaN, 1] }, 5), 'bad_fit'],
    ['interval kind', () => interval(f, 50, { kind: 'both' as never }), 'bad_option'],
    ['interval level', () => interval(f, 50, { kind: 'prediction', level: 1.5 }), 'bad_level'],
    ['inverse of NaN', () => lengthForBiomass(f, NaN), 'not_finite'],
  ])('%s → %s', (_name, run, code) => {
    expect(codeOf(run as () => unknown)).toBe(code);
  });
});

describe('lengthForBiomass', () => {
  const lin = fitCalibration(HAND, 'linear');

  it('linear closed form inside the range', () => {
    const r = lengthForBiomass(lin, 10);
    expect(r.ok).toBe(true);
    if (r.ok) {
      expect(predict(lin, r.x)).toBeCloseTo(10, 10);
      expect(r.extrapolated).toBe(false);
    }
  });

  it('not reached within the calibrated range, unless extrapolating', () => {
    const r = lengthForBiomass(lin, 100);
    expect(r).toMatchObject({ ok: false, code: 'not_reached_in_range' });
    if (!r.ok) expect(r.reachable[1]).toBeCloseTo(predict(lin, 10), 10);
    const e = lengthForBiomass(lin, 100, { extrapolate: true });
    expect(e.ok && e.extrapolated).toBe(true);
  });

  it('log models: non-positive biomass is never reached', () => {
    const f = fitCalibration(powerPoints(20, 2), 'power');
    expect(lengthForBiomass(f, 0)).toMatchObject({ ok: false, code: 'never_reached' });
  });

  it('quadratic that turns over inside the range: solves on the rising piece only', () => {
    // y = −(x − 5)² + 25 on x in 0..8: rises to 25 at x = 5, then falls.
    const f = fitCalibration([0, 1, 2, 3, 4, 5, 6, 7, 8].map((x) => ({ x, y: 25 - (x - 5) ** 2 + (x % 2 ? 0.01 : -0.01) })), 'quadratic');
    const r = lengthForBiomass(f, 16);
    expect(r.ok).toBe(true);
    if (r.ok) expect(r.x).toBeCloseTo(2, 1); // not the falling-side root near 8
    expect(lengthForBiomass(f, 30)).toMatchObject({ ok: false });
  });
});

describe('compareModels', () => {
  it('ranks all four by leave-one-out RMSE and recommends the first', () => {
    const c = compareModels(powerPoints(150, 9));
    expect(c.ranked).toHaveLength(4);
    expect(c.failed).toHaveLength(0);
    const loo = c.ranked.map((r) => r.looRmse as number);
    expect([...loo].sort((a, b) => a - b)).toEqual(loo);
    const best = at(c.ranked, 0, 'ranked model');
    expect(c.recommendation.model).toBe(best.model);
    expect(c.recommendation.message).toContain(best.model);
  });

  it('lists models that cannot be fitted, with the reason', () => {
    const pts = [{ x: 5, y: 0 }, ...powerPoints(12, 4)];
    const c = compareModels(pts);
    expect(c.ranked.map((r) => r.model).sort()).toEqual(['linear', 'quadratic']);
    expect(c.failed).toEqual([
      expect.objectContaining({ model: 'power', code: 'non_positive_y' }),
      expect.objectContaining({ model: 'exponential', code: 'non_positive_y' }),
    ]);
    expect(c.recommendation.message).toMatch(/draft/);
  });

  it('too few points for the quadratic only', () => {
    const c = compareModels(powerPoints(3, 4));
    expect(c.failed).toEqual([expect.objectContaining({ model: 'quadratic', code: 'too_few_points' })]);
  });

  it('empty input is an error, not four failures', () => {
    expect(codeOf(() => compareModels([]))).toBe('empty');
  });
});
