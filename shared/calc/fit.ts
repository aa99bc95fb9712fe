import { Matrix, QrDecomposition } from 'ml-matrix';
import { CalcError } from './errors';
import { MODELS, isLogModel, paramCount, type CalibrationPoint, type Fit, type ModelKind } from './fit-types';
import { sig } from './format';

/*
 * Least squares for the four calibration models, all linear in their parameters after transforming:
 *   linear/quadratic: y on [1, x(, x²)];  power: ln y on [1, ln x];  exponential: ln y on [1, x].
 * Solved by Householder QR (ml-matrix) on a centred and scaled predictor u = (t − mean)/sd, never by
 * normal equations: forming X'X squares the condition number (NIST Pontius, x to 3·10⁶, has x⁴ ≈ 10²⁶).
 * Coefficients are then mapped back to the raw parameterisation with the matching linear map T
 * (β = T·γ) and their covariance carried as T·C·T'.
 */

function validatePoints(points: unknown): CalibrationPoint[] {
  if (!Array.isArray(points) || points.length === 0) {
    throw new CalcError('empty', 'A calibration needs a list of (length, biomass) points.', 'points');
  }
  points.forEach((p, i) => {
    const ok =
      typeof p === 'object' && p !== null &&
      typeof (p as CalibrationPoint).x === 'number' && Number.isFinite((p as CalibrationPoint).x) &&
      typeof (p as CalibrationPoint).y === 'number' && Number.isFinite((p as CalibrationPoint).y);
    if (!ok) throw new CalcError('not_finite', `Point ${i + 1} needs finite numeric x and y.`, 'points');
  });
  return points as CalibrationPoint[];
}

/** Back substitution for R·x = b, R upper triangular p×p. */
function backSolve(R: number[][], b: number[]): number[] {
  const p = b.length;
  const x = new Array<number>(p).fill(0);
  for (let i = p - 1; i >= 0; i--) {
    let s = b[i]!;
    for (let j = i + 1; j < p; j++) s -= R[i]![j]! * x[j]!;
    x[i] = s / R[i]![i]!;
  }
  return x;
}

function mulTCTt(T: number[][], C: number[][]): number[][] {
  const p = T.length;
  const TC = T.map((row) => C[0]!.map((_, j) => row.reduce((s, t, k) => s + t * C[k]![j]!, 0)));
  return TC.map((row) => T.map((trow) => row.reduce((s, v, k) => s + v * trow[k]!, 0))).slice(0, p);
}

function equationOf(model: ModelKind, c: number[], cf: number): string {
  const s = (v: number) => sig(v, 4);
  const plus = (v: number) => (v < 0 ? ` − ${s(-v)}` : ` + ${s(v)}`);
  switch (model) {
    case 'linear':
      return `y = ${s(c[0]!)}${plus(c[1]!)}·x`;
    case 'quadratic':
      return `y = ${s(c[0]!)}${plus(c[1]!)}·x${plus(c[2]!)}·x²`;
    case 'power':
      return `y = ${s(c[0]!)} · x^${s(c[1]!)} × ${s(cf)}`;
    case 'exponential':
      return `y = ${s(c[0]!)} · e^(${s(c[1]!)}·x) × ${s(cf)}`;
  }
}

export function fitCalibration(points: CalibrationPoint[], model: ModelKind): Fit {
  if (!MODELS.includes(model)) {
    throw new CalcError('bad_model', `Unknown model "${String(model)}"; use linear, power, exponential or quadratic.`, 'model');
  }
  const pts = validatePoints(points);
  const n = pts.length;
  const p = paramCount(model);
  const log = isLogModel(model);
  if (n < p + 1) {
    throw new CalcError(
      'too_few_points',
      `The ${model} model has ${p} coefficients and needs at least ${p + 1} points (it has ${n}).`,
      'points',
    );
  }
  let xMin = Infinity, xMax = -Infinity, yMin = Infinity, yMax = -Infinity;
  for (const { x, y } of pts) {
    if (x < xMin) xMin = x;
    if (x > xMax) xMax = x;
    if (y < yMin) yMin = y;
    if (y > yMax) yMax = y;
  }
  if (xMin === xMax) {
    throw new CalcError('x_all_equal', 'All lengths are equal, so no curve can be fitted through them.', 'points');
  }
  if (model === 'quadratic' && new Set(pts.map((q) => q.x)).size < 3) {
    throw new CalcError('too_few_distinct_x', 'The quadratic model needs at least 3 different lengths.', 'points');
  }
  if (log && yMin <= 0) {
    throw new CalcError('non_positive_y', `The ${model} model fits log(biomass), so every biomass must be greater than zero.`, 'points');
  }
  if (model === 'power' && xMin <= 0) {
    throw new CalcError('non_positive_x', 'The power model fits log(length), so every length must be greater than zero.', 'points');
  }

  // Transformed predictor t and response r.
  const t = new Float64Array(n);
  const r = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    t[i] = model === 'power' ? Math.log(pts[i]!.x) : pts[i]!.x;
    r[i] = log ? Math.log(pts[i]!.y) : pts[i]!.y;
  }
  let tSum = 0;
  for (let i = 0; i < n; i++) tSum += t[i]!;
  const centre = tSum / n;
  let tss = 0;
  for (let i = 0; i < n; i++) tss += (t[i]! - centre) ** 2;
  const scale = Math.sqrt(tss / (n - 1));
  if (!(scale > 0)) {
    throw new CalcError('x_all_equal', 'All lengths are equal, so no curve can be fitted through them.', 'points');
  }

  const Z: number[][] = new Array(n);
  for (let i = 0; i < n; i++) {
    const u = (t[i]! - centre) / scale;
    Z[i] = p === 2 ? [1, u] : [1, u, u * u];
  }
  const qr = new QrDecomposition(new Matrix(Z));
  const Q = qr.orthogonalMatrix; // n×p, orthonormal columns
  const R = qr.upperTriangularMatrix.to2DArray();
  const rMax = Math.max(...R.map((row, i) => Math.abs(row[i]!)));
  if (R.some((row, i) => !(Math.abs(row[i]!) > 1e-10 * rMax))) {
    throw new CalcError('too_few_distinct_x', `The lengths do not spread enough to fit the ${model} model.`, 'points');
  }

  // γ = R⁻¹·Q'r; hat-matrix leverages h_ii = Σ_j Q_ij².
  const Qtr = new Array<number>(p).fill(0);
  const h = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let hi = 0;
    for (let j = 0; j < p; j++) {
      const q = Q.get(i, j);
      Qtr[j]! += q * r[i]!;
      hi += q * q;
    }
    h[i] = hi;
  }
  const gamma = backSolve(R, Qtr);

  // C = (Z'Z)⁻¹ = R⁻¹R⁻ᵀ (columns of R⁻¹ by back substitution on unit vectors).
  const Rinv: number[][] = Array.from({ length: p }, () => new Array<number>(p).fill(0));
  for (let k = 0; k < p; k++) {
    const e = new Array<number>(p).fill(0);
    e[k] = 1;
    const col = backSolve(R, e);
    for (let i = 0; i < p; i++) Rinv[i]![k] = col[i]!;
  }
  const C = Rinv.map((ri) => Rinv.map((rj) => ri.reduce((s, v, k) => s + v * rj[k]!, 0)));

  // Residuals on the fitted scale, from the centred basis (best precision).
  const e = new Float64Array(n);
  let sse = 0;
  let rSum = 0;
  for (let i = 0; i < n; i++) rSum += r[i]!;
  const rMean = rSum / n;
  let sst = 0;
  for (let i = 0; i < n; i++) {
    const u = (t[i]! - centre) / scale;
    const fitted = p === 2 ? gamma[0]! + gamma[1]! * u : gamma[0]! + u * (gamma[1]! + gamma[2]! * u);
    e[i] = r[i]! - fitted;
    sse += e[i]! * e[i]!;
    sst += (r[i]! - rMean) ** 2;
  }
  const df = n - p;
  const sigma2 = sse / df;

  // Raw parameterisation β = T·γ.
  const m = centre, s = scale;
  const T: number[][] =
    p === 2
      ? [[1, -m / s], [0, 1 / s]]
      : [[1, -m / s, (m * m) / (s * s)], [0, 1 / s, (-2 * m) / (s * s)], [0, 0, 1 / (s * s)]];
  const beta = T.map((row) => row.reduce((acc, v, k) => acc + v * gamma[k]!, 0));
  const covRaw = mulTCTt(T, C);
  const standardErrors = covRaw.map((row, i) => Math.sqrt(Math.max(0, sigma2 * row[i]!)));

  // Duan (1983) smearing for the log models.
  let cf = 1;
  if (log) {
    let acc = 0;
    for (let i = 0; i < n; i++) acc += Math.exp(e[i]!);
    cf = acc / n;
  }

  // Leave-one-out by the closed form: on the fitted scale the deleted residual is e_i/(1 − h_ii),
  // exactly what refitting without point i gives. For the log models the smearing factor is
  // refitted too: without point i the other residuals become e_j + h_ji·e_i/(1 − h_ii) (the
  // rank-one downdate of the fit), and the factor is their mean exp. The log models are straight
  // lines in the centred u (Σu = 0, Σu² = n − 1), so h_ji = 1/n + u_i·u_j/(n − 1) and the sum over j
  // is F(c) = Σ_j exp(e_j)·exp(c·u_j) at c = shift·u_i/(n − 1): a power series in c whose moments are
  // computed once (O(n) instead of O(n²)); a large |c| falls back to the direct sum.
  let looSS = 0;
  let looOk = true;
  const u = new Float64Array(n);
  const w = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    u[i] = (t[i]! - centre) / scale;
    w[i] = Math.exp(e[i]!);
  }
  const smearSum = log ? looSmearingSums(u, w) : undefined;
  for (let i = 0; i < n; i++) {
    const denom = 1 - h[i]!;
    if (denom < 1e-10) {
      looOk = false;
      break;
    }
    const shift = e[i]! / denom;
    const rLoo = r[i]! - shift;
    let yLoo = rLoo;
    if (smearSum) {
      const c = (shift * u[i]!) / (n - 1);
      const others = Math.exp(shift / n) * (smearSum(c) - w[i]! * Math.exp(c * u[i]!));
      yLoo = Math.exp(rLoo) * (others / (n - 1));
    }
    looSS += (pts[i]!.y - yLoo) ** 2;
  }

  const coefficients = log ? [Math.exp(beta[0]!), beta[1]!] : beta.slice();
  // A Fit must survive JSON (which turns Infinity into null): refuse numbers too large to store.
  if (![...coefficients, ...beta, ...standardErrors, cf, sigma2].every(Number.isFinite)) {
    throw new CalcError('bad_fit', `The ${model} model gives numbers too large to represent for these points; try another model.`, 'points');
  }
  return {
    schema: 1,
    model,
    n,
    df,
    coefficients,
    fittedScaleCoefficients: beta,
    standardErrors,
    rSquared: sst > 0 ? 1 - sse / sst : 1,
    residualStdError: Math.sqrt(sigma2),
    looRmse: looOk ? Math.sqrt(looSS / n) : null,
    xRange: [xMin, xMax],
    yRange: [yMin, yMax],
    biasCorrection: cf,
    biasCorrectionMethod: log ? 'smearing' : 'none',
    basis: { centre, scale },
    centredCoefficients: gamma,
    covUnscaled: C,
    equation: equationOf(model, coefficients, cf),
  };
}

/**
 * F(c) = Σ_j w_j·exp(c·u_j) for many c: by its Taylor series Σ_k c^k/k!·Σ_j w_j·u_j^k when |c|·max|u|
 * ≤ 1 (30 terms leave under 1e-30 of F and no cancellation beyond e² of rounding), else directly.
 */
function looSmearingSums(u: Float64Array, w: Float64Array): (c: number) => number {
  const K = 30;
  const moments = new Float64Array(K + 1);
  let uMax = 0;
  for (let j = 0; j < u.length; j++) {
    let term = w[j]!;
    for (let k = 0; k <= K; k++) {
      moments[k]! += term;
      term *= u[j]!;
    }
    uMax = Math.max(uMax, Math.abs(u[j]!));
  }
  return (c) => {
    if (Math.abs(c) * uMax > 1) {
      let acc = 0;
      for (let j = 0; j < u.length; j++) acc += w[j]! * Math.exp(c * u[j]!);
      return acc;
    }
    let acc = 0;
    for (let k = K; k >= 0; k--) acc = acc * (c / (k + 1)) + moments[k]!;
    return acc;
  };
}
