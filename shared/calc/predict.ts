import { CalcError } from './errors';
import { MODELS, isLogModel, paramCount, type Fit } from './fit-types';
import { tCritical } from './t-dist';
import { requireFinite, requireLevel } from './validate';

// Prediction from a stored Fit. Deliberately free of ml-matrix: the phone computes estimates live.

const checked = new WeakSet<object>();

function finiteArray(a: unknown, len: number): boolean {
  return Array.isArray(a) && a.length === len && a.every((v) => typeof v === 'number' && Number.isFinite(v));
}

/** Cheap structural check of a Fit read back from JSON; remembered per object so repeats are free. */
export function assertFit(fit: unknown): asserts fit is Fit {
  if (typeof fit === 'object' && fit !== null && checked.has(fit)) return;
  const f = fit as Partial<Fit> | null;
  const bad = (what: string): never => {
    throw new CalcError('bad_fit', `The calibration fit is malformed (${what}); refit or reload it.`, 'fit');
  };
  if (typeof f !== 'object' || f === null) bad('not an object');
  if (!MODELS.includes(f!.model as never)) bad('unknown model');
  const p = paramCount(f!.model!);
  if (!finiteArray(f!.coefficients, p)) bad('coefficients');
  if (!finiteArray(f!.fittedScaleCoefficients, p)) bad('fittedScaleCoefficients');
  if (!Number.isInteger(f!.df) || f!.df! < 1) bad('df');
  if (typeof f!.residualStdError !== 'number' || !(f!.residualStdError >= 0)) bad('residualStdError');
  if (typeof f!.biasCorrection !== 'number' || !(f!.biasCorrection > 0) || !Number.isFinite(f!.biasCorrection)) bad('biasCorrection');
  if (!finiteArray(f!.xRange, 2) || f!.xRange![0] > f!.xRange![1]) bad('xRange');
  const b = f!.basis;
  if (!b || !Number.isFinite(b.centre) || !Number.isFinite(b.scale) || !(b.scale > 0)) bad('basis');
  if (f!.centredCoefficients !== undefined && !finiteArray(f!.centredCoefficients, p)) bad('centredCoefficients');
  if (!Array.isArray(f!.covUnscaled) || f!.covUnscaled.length !== p || !f!.covUnscaled.every((r) => finiteArray(r, p))) bad('covUnscaled');
  checked.add(f as object);
}

function requireX(fit: Fit, x: number): number {
  requireFinite(x, 'x');
  if (fit.model === 'power' && x <= 0) {
    throw new CalcError('non_positive', 'The power curve is defined only for lengths greater than zero.', 'x');
  }
  return x;
}

/** The model's predictor on its fitted scale (ln y for the log models), from the raw coefficients. */
export function linearPredictor(fit: Fit, x: number): number {
  const c = fit.coefficients;
  switch (fit.model) {
    case 'linear':
      return c[0]! + c[1]! * x;
    case 'quadratic': {
      const g = fit.centredCoefficients;
      if (!g) return c[0]! + x * (c[1]! + c[2]! * x);
      const u = (x - fit.basis.centre) / fit.basis.scale;
      return g[0]! + u * (g[1]! + g[2]! * u);
    }
    case 'power':
      return fit.fittedScaleCoefficients[0]! + c[1]! * Math.log(x);
    case 'exponential':
      return fit.fittedScaleCoefficients[0]! + c[1]! * x;
  }
}

/** Predicted y at x; for the log models the bias-corrected mean, a·x^b·CF or a·e^(bx)·CF. */
export function predict(fit: Fit, x: number): number {
  assertFit(fit);
  requireX(fit, x);
  const eta = linearPredictor(fit, x);
  return isLogModel(fit.model) ? Math.exp(eta) * fit.biasCorrection : eta;
}

export type IntervalKind = 'confidence' | 'prediction';

export interface IntervalOptions {
  level?: number;
  kind: IntervalKind;
}

/** z0' C z0 in the centred basis: the unscaled variance of the fitted value at x (the leverage of x). */
export function leverageAt(fit: Fit, x: number): number {
  const t = fit.model === 'power' ? Math.log(x) : x;
  const u = (t - fit.basis.centre) / fit.basis.scale;
  const C = fit.covUnscaled;
  if (C.length === 2) {
    return C[0]![0]! + 2 * u * C[0]![1]! + u * u * C[1]![1]!;
  }
  const u2 = u * u;
  return C[0]![0]! + u2 * C[1]![1]! + u2 * u2 * C[2]![2]! + 2 * (u * C[0]![1]! + u2 * C[0]![2]! + u * u2 * C[1]![2]!);
}

/**
 * Confidence interval of the mean response, or prediction interval of one new observation, at x.
 * Linear-scale models: ŷ ± t·s·√(q) or √(1+q), q the leverage of x.
 * Log models: the interval is built on the log scale and back-transformed, so it is asymmetric.
 *  - prediction: [exp(η − t·s·√(1+q)), exp(η + t·s·√(1+q))] — exp maps quantiles of ln y to quantiles
 *    of y exactly, so no bias correction belongs here;
 *  - confidence: CF·[exp(η − t·s·√q), exp(η + t·s·√q)] — an interval for the mean response, the
 *    smearing factor treated as known (as predict does).
 */
export function interval(fit: Fit, x: number, options: IntervalOptions): [number, number] {
  assertFit(fit);
  requireX(fit, x);
  const level = options?.level ?? 0.95;
  requireLevel(level);
  const kind = options?.kind;
  if (kind !== 'confidence' && kind !== 'prediction') {
    throw new CalcError('bad_option', "kind must be 'confidence' or 'prediction'.", 'kind');
  }
  const q = Math.max(0, leverageAt(fit, x)); // guard tiny negative rounding
  const se = fit.residualStdError * Math.sqrt(kind === 'prediction' ? 1 + q : q);
  const half = tCritical(level, fit.df) * se;
  const eta = linearPredictor(fit, x);
  if (!isLogModel(fit.model)) return [eta - half, eta + half];
  const cf = kind === 'confidence' ? fit.biasCorrection : 1;
  return [Math.exp(eta - half) * cf, Math.exp(eta + half) * cf];
}

/**
 * Where the curve is monotone, as an x interval (bounds may be infinite), and whether it rises there.
 * Only the quadratic can turn; its monotone piece is the one on which it rises (biomass grows with
 * length), or the falling one when it falls throughout the calibrated range.
 */
export function monotoneDomain(fit: Fit): { lo: number; hi: number; increasing: boolean } {
  assertFit(fit);
  const c = fit.coefficients;
  const minX = fit.model === 'power' ? 0 : -Infinity;
  if (fit.model !== 'quadratic' || c[2] === 0) {
    return { lo: minX, hi: Infinity, increasing: c[1]! >= 0 };
  }
  const vertex = -c[1]! / (2 * c[2]!);
  const [x0, x1] = fit.xRange;
  if (vertex <= x0) return { lo: vertex, hi: Infinity, increasing: c[2]! > 0 };
  if (vertex >= x1) return { lo: -Infinity, hi: vertex, increasing: c[2]! < 0 };
  // The vertex lies inside the calibrated range: keep the rising piece.
  return c[2]! < 0 ? { lo: -Infinity, hi: vertex, increasing: true } : { lo: vertex, hi: Infinity, increasing: true };
}

/** min and max of predict over [lo, hi] (the quadratic can peak inside). */
export function curveRange(fit: Fit, lo: number, hi: number): [number, number] {
  let a = predict(fit, lo);
  let b = predict(fit, hi);
  if (a > b) [a, b] = [b, a];
  if (fit.model === 'quadratic' && fit.coefficients[2] !== 0) {
    const v = -fit.coefficients[1]! / (2 * fit.coefficients[2]!);
    if (v > lo && v < hi) {
      const pv = predict(fit, v);
      a = Math.min(a, pv);
      b = Math.max(b, pv);
    }
  }
  return [a, b];
}
