import { CalcError } from './errors';
import { fitCalibration } from './fit';
import { MODELS, type CalibrationPoint, type Fit, type ModelKind } from './fit-types';
import { sig } from './format';

export interface RankedModel {
  model: ModelKind;
  looRmse: number | null;
  fit: Fit;
}

export interface FailedModel {
  model: ModelKind;
  code: string;
  message: string;
}

export interface ModelComparison {
  /** Fitted models, best (smallest leave-one-out RMSE in original units) first. */
  ranked: RankedModel[];
  /** Models that could not be fitted, with the reason. */
  failed: FailedModel[];
  recommendation: { model: ModelKind | null; message: string };
}

/** Differences in LOO RMSE below this fraction are treated as a tie in the advice. */
const TIE = 0.05;

/**
 * Fits all four models and ranks them by leave-one-out RMSE in original units (R² is no guide here:
 * the log models' R² is on the log scale). The advice is plain words for the calibration screen.
 */
export function compareModels(points: CalibrationPoint[]): ModelComparison {
  const ranked: RankedModel[] = [];
  const failed: FailedModel[] = [];
  for (const model of MODELS) {
    try {
      const fit = fitCalibration(points, model);
      ranked.push({ model, looRmse: fit.looRmse, fit });
    } catch (e) {
      if (!(e instanceof CalcError)) throw e;
      // Input that no model accepts (empty, non-numeric) is the caller's error, not a per-model one.
      if (e.code === 'empty' || e.code === 'not_finite') throw e;
      failed.push({ model, code: e.code, message: e.message });
    }
  }
  ranked.sort((a, b) => (a.looRmse ?? Infinity) - (b.looRmse ?? Infinity));

  let recommendation: ModelComparison['recommendation'];
  const best = ranked[0];
  if (!best) {
    recommendation = { model: null, message: `No model could be fitted: ${failed[0]?.message ?? 'no usable points.'}` };
  } else if (best.looRmse === null) {
    recommendation = {
      model: null,
      message: 'Too few points to cross-validate (one point alone fixes part of each curve); add more paired samples before choosing a model.',
    };
  } else {
    const parts = [
      `The ${best.model} curve predicts left-out points best (leave-one-out RMSE ${sig(best.looRmse, 3)} in biomass units).`,
    ];
    const second = ranked[1];
    if (second?.looRmse != null) {
      const gap = (second.looRmse - best.looRmse) / best.looRmse;
      parts.push(
        gap < TIE
          ? `The ${second.model} curve is within ${Math.max(1, Math.round(gap * 100))}% of it, so either would serve; prefer the one whose shape is sensible at the shortest and tallest lengths.`
          : `The next best, ${second.model}, is ${Math.round(gap * 100)}% worse.`,
      );
    }
    if (best.model === 'quadratic') {
      const [, b = 0, c = 0] = best.fit.coefficients; // a quadratic has three
      const v = -b / (2 * c);
      if (v > best.fit.xRange[0] && v < best.fit.xRange[1]) {
        parts.push('Caution: this quadratic turns over inside the measured lengths, so it would give taller plants less biomass there.');
      }
    }
    if (best.fit.n < 30) parts.push(`With only ${best.fit.n} points, treat this as a draft calibration.`);
    recommendation = { model: best.model, message: parts.join(' ') };
  }
  return { ranked, failed, recommendation };
}
