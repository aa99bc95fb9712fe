import type { Fit } from './fit-types';
import { assertFit, curveRange, monotoneDomain } from './predict';
import { requireFinite } from './validate';
import { sig } from './format';

export type LengthForBiomassResult =
  | { ok: true; x: number; extrapolated: boolean }
  | {
      ok: false;
      code: 'not_reached_in_range' | 'never_reached';
      message: string;
      /** What the curve does reach over the searched lengths, [min, max] of y. */
      reachable: [number, number];
    };

export interface LengthForBiomassOptions {
  /** Also solve outside the calibrated x range (still only on the monotone piece). Default false. */
  extrapolate?: boolean;
}

/**
 * The x at which predict(fit, x) = y: closed forms, inverting exactly what predict computes
 * (including the bias correction of the log models). Only the monotone piece of the curve counts;
 * without `extrapolate`, only the calibrated x range. A result object rather than an exception,
 * because "not reached" is an ordinary answer (a short crop), not an error.
 */
export function lengthForBiomass(fit: Fit, y: number, options: LengthForBiomassOptions = {}): LengthForBiomassResult {
  assertFit(fit);
  requireFinite(y, 'y');
  const extrapolate = options.extrapolate === true;
  const dom = monotoneDomain(fit);
  const [x0, x1] = fit.xRange;
  const lo = extrapolate ? dom.lo : Math.max(dom.lo, x0);
  const hi = extrapolate ? dom.hi : Math.min(dom.hi, x1);
  const c = fit.coefficients;
  let x: number = NaN;

  switch (fit.model) {
    case 'linear':
      if (c[1] !== 0) x = (y - c[0]!) / c[1]!;
      break;
    case 'quadratic': {
      if (c[2] === 0) {
        if (c[1] !== 0) x = (y - c[0]!) / c[1]!;
        break;
      }
      // c·x² + b·x + (a − y) = 0, pick the root on the monotone piece. The stable form avoids
      // cancellation when b² ≫ 4ac.
      const A = c[2]!, B = c[1]!, Cc = c[0]! - y;
      let disc = B * B - 4 * A * Cc;
      // At the vertex the discriminant is 0 up to rounding; a tiny negative value still has a root.
      if (disc < 0 && disc > -1e-12 * (B * B + Math.abs(4 * A * Cc))) disc = 0;
      if (disc < 0) break;
      const sq = Math.sqrt(disc);
      const qv = -0.5 * (B + (B >= 0 ? sq : -sq));
      const roots = [qv / A, qv !== 0 ? Cc / qv : -B / A];
      const slack = 1e-9 * Math.max(1, Math.abs(dom.lo === -Infinity ? 0 : dom.lo), Math.abs(dom.hi === Infinity ? 0 : dom.hi));
      const r = roots.find((v) => v >= dom.lo - slack && v <= dom.hi + slack);
      x = r === undefined ? NaN : Math.min(Math.max(r, dom.lo), dom.hi);
      break;
    }
    case 'power':
    case 'exponential': {
      if (y <= 0 || c[1] === 0) break;
      const eta = Math.log(y / fit.biasCorrection) - fit.fittedScaleCoefficients[0]!;
      x = fit.model === 'power' ? Math.exp(eta / c[1]!) : eta / c[1]!;
      break;
    }
  }

  const tol = 1e-9 * Math.max(1, Math.abs(x0), Math.abs(x1));
  if (Number.isFinite(x) && x >= lo - tol && x <= hi + tol) {
    return { ok: true, x, extrapolated: x < x0 - tol || x > x1 + tol };
  }
  // Describe what is reachable over the searched lengths (the calibrated, monotone range).
  const sLo = Number.isFinite(lo) ? lo : x0;
  const sHi = Number.isFinite(hi) ? hi : x1;
  const reachable = sLo <= sHi && !(fit.model === 'power' && sLo <= 0) ? curveRange(fit, sLo, sHi) : curveRange(fit, x0, x1);
  if (!Number.isFinite(x)) {
    return {
      ok: false,
      code: 'never_reached',
      message: `This calibration curve never reaches ${sig(y, 4)}.`,
      reachable,
    };
  }
  return {
    ok: false,
    code: 'not_reached_in_range',
    message: `The curve does not reach ${sig(y, 4)} within the calibrated lengths ${sig(x0, 4)}–${sig(x1, 4)}; it spans ${sig(reachable[0], 4)}–${sig(reachable[1], 4)} there.`,
    reachable,
  };
}
