// Types shared by fitting (fit.ts, which needs ml-matrix) and by prediction (predict.ts, which
// must not), so the phone's estimate screen can use a stored Fit without the matrix library.

export const MODELS = ['linear', 'power', 'exponential', 'quadratic'] as const;
export type ModelKind = (typeof MODELS)[number];

export interface CalibrationPoint {
  x: number;
  y: number;
}

/**
 * A fitted calibration as plain JSON: store it, send it, JSON.parse it, and predict() gives the same
 * numbers. x is mean main shoot length (cm) and y oven-dry shoot biomass (kg/ha) when used as a
 * Crowntip calibration, but fitting itself is unit-agnostic (the NIST checks use other units).
 *
 * Models and coefficient order (raw parameterisation, as reported):
 * - linear       y = a + b·x              coefficients [a, b]
 * - quadratic    y = a + b·x + c·x²       coefficients [a, b, c]
 * - power        y = a·x^b · CF           coefficients [a, b]   fitted as ln y = ln a + b·ln x
 * - exponential  y = a·e^(b·x) · CF       coefficients [a, b]   fitted as ln y = ln a + b·x
 * CF is `biasCorrection` (1 for the linear-scale models).
 */
export interface Fit {
  schema: 1;
  model: ModelKind;
  n: number;
  /** Residual degrees of freedom, n − number of coefficients. */
  df: number;
  coefficients: number[];
  /** The coefficients of the regression actually fitted: [ln a, b] for the log models, else = coefficients. */
  fittedScaleCoefficients: number[];
  /** Standard errors of fittedScaleCoefficients (so of ln a, not a, for the log models). */
  standardErrors: number[];
  /** R² of the fitted regression (on the log scale for the log models, so not comparable across scales). */
  rSquared: number;
  /** √(SSE/df) of the fitted regression (log scale for the log models). */
  residualStdError: number;
  /** Leave-one-out cross-validated RMSE in original y units; null when a point has leverage 1. */
  looRmse: number | null;
  xRange: [number, number];
  yRange: [number, number];
  /**
   * Back-transformation bias correction for the log models: Duan's (1983) smearing estimate
   * mean(exp(residual)). Chosen over the lognormal exp(s²/2) because it does not assume the log
   * residuals are normal (field calibrations often have skewed or heavy-tailed scatter) and it equals
   * exp(s²/2) when they are. 1 for linear and quadratic.
   */
  biasCorrection: number;
  biasCorrectionMethod: 'none' | 'smearing';
  /**
   * The centred, scaled basis the least squares was solved in: t = x (or ln x for power),
   * u = (t − centre)/scale, design row [1, u] or [1, u, u²]. covUnscaled is (Z'Z)⁻¹ in that basis;
   * the parameter covariance is residualStdError² · covUnscaled. Intervals are computed in this
   * basis because raw x², x⁴ products would lose digits (NIST Pontius has x up to 3·10⁶).
   */
  basis: { centre: number; scale: number };
  /**
   * The coefficients in that basis (y, or ln y, = γ0 + γ1·u (+ γ2·u²)). The quadratic predicts from
   * these: the raw a + b·x + c·x² cancels digits when x is far from 0. Absent in fits stored before
   * it was added; those predict from the raw coefficients.
   */
  centredCoefficients?: number[];
  covUnscaled: number[][];
  /** Human-readable equation, e.g. "y = 0.8105 · x^1.775 × 1.024". */
  equation: string;
}

export function paramCount(model: ModelKind): number {
  return model === 'quadratic' ? 3 : 2;
}

export function isLogModel(model: ModelKind): boolean {
  return model === 'power' || model === 'exponential';
}
