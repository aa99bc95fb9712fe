import {
  CM_PER_IN,
  MODELS,
  cmToIn,
  kgPerHaToLbPerAc,
  compareModels,
  isLogModel,
  lengthForBiomass,
  lookupTable,
  type Fit,
  type LengthForBiomassResult,
  type LookupRow,
  type ModelComparison,
  type ModelKind,
} from '../../shared/calc';
import type { Calibration, DatasetPoint } from './db';
import { calibrationCharts, type CalibrationCharts, type DisplayUnits } from './charts';

/* What the fit page and the lookup table show, computed from the estimation core only. */

export const MODEL_LABELS: Record<ModelKind, string> = {
  linear: 'Linear',
  power: 'Power (log–log)',
  exponential: 'Exponential (log–linear)',
  quadratic: 'Quadratic',
};

/** Coefficient names in the order of Fit.coefficients. */
export const COEFFICIENT_NAMES: Record<ModelKind, string[]> = {
  linear: ['a', 'b'],
  quadratic: ['a', 'b', 'c'],
  power: ['a', 'b'],
  exponential: ['a', 'b'],
};

export interface ComparisonRow {
  model: ModelKind;
  rank: number;
  fit: Fit;
  logScale: boolean;
  recommended: boolean;
  chosen: boolean;
}

export interface FitPageView {
  comparison: ModelComparison;
  rows: ComparisonRow[];
  chosenModel: ModelKind | null;
  chosenFit: Fit | null;
  charts: CalibrationCharts | null;
}

/**
 * The four models side by side (compareModels on the stored points) and the charts of one of
 * them: the one asked for, else the calibration's own (for a published one its stored fit, which
 * is what estimates use), else the recommendation.
 */
export function fitPageView(c: Calibration, points: DatasetPoint[], opts: { model?: ModelKind; units: DisplayUnits; thresholdKgHa: number }): FitPageView {
  const comparison = compareModels(points.map(({ x, y }) => ({ x, y })));
  const fitted = new Set(comparison.ranked.map((r) => r.model));
  const wanted = opts.model && fitted.has(opts.model) ? opts.model : null;
  const chosenModel = wanted ?? (c.model && fitted.has(c.model) ? c.model : null) ?? comparison.recommendation.model ?? comparison.ranked[0]?.model ?? null;
  const chosenFit =
    chosenModel === null ? null : chosenModel === c.model && c.status !== 'draft' && c.fit ? c.fit : comparison.ranked.find((r) => r.model === chosenModel)!.fit;
  const rows = comparison.ranked.map((r, i) => ({
    model: r.model,
    rank: i + 1,
    fit: r.fit,
    logScale: isLogModel(r.model),
    recommended: r.model === comparison.recommendation.model,
    chosen: r.model === chosenModel,
  }));
  const charts = chosenFit
    ? calibrationCharts({ id: `cal-${c.id.slice(0, 8)}`, fit: chosenFit, points, units: opts.units, thresholdKgHa: opts.thresholdKgHa, subject: `${c.cropLabel}, ${MODEL_LABELS[chosenFit.model].toLowerCase()}` })
    : null;
  return { comparison, rows, chosenModel, chosenFit, charts };
}

export const isModel = (v: unknown): v is ModelKind => MODELS.includes(v as ModelKind);

export type LookupViewRow = LookupRow & {
  threshold: boolean;
  /** The length in the other unit (cm in an inch table, inches in a cm table). */
  lengthOther: number;
};

export interface LookupView {
  unit: 'in' | 'cm';
  step: number;
  rows: LookupViewRow[];
  /** The rows split in two halves for a two-column printout when there are many. */
  columns: LookupViewRow[][];
  thresholdKgHa: number;
  thresholdLbAc: number;
  thresholdAt: LengthForBiomassResult;
  /** Index of the threshold row in `rows`, or -1. */
  thresholdIndex: number;
}

export const LOOKUP_STEPS = { in: 1, cm: 2 } as const;
/** A table longer than this would not print on two sheets. */
export const MAX_LOOKUP_PAGE_ROWS = 240;

/**
 * The lookup table over the calibrated lengths, widened outwards to whole steps (the end rows
 * outside the data are marked extrapolated). The threshold row is the first step at or above the
 * length where the curve reaches the threshold (lengthForBiomass), so the printed row and the
 * inverse agree.
 */
export function lookupView(fit: Fit, opts: { unit: 'in' | 'cm'; thresholdKgHa: number; from?: number; to?: number }): LookupView {
  const unit = opts.unit;
  const step = LOOKUP_STEPS[unit];
  const perUnit = unit === 'in' ? CM_PER_IN : 1;
  let from = opts.from ?? Math.floor(fit.xRange[0] / perUnit / step + 1e-9) * step;
  const to = opts.to ?? Math.ceil(fit.xRange[1] / perUnit / step - 1e-9) * step;
  if (from <= 0) from = step; // no zero-length row (and the power curve starts above zero)
  const table = lookupTable(fit, { unit, step, from, to });
  let thresholdAt = lengthForBiomass(fit, opts.thresholdKgHa);
  if (!thresholdAt.ok) {
    // Beyond the calibrated lengths the table's extrapolated rows may still reach it.
    const beyond = lengthForBiomass(fit, opts.thresholdKgHa, { extrapolate: true });
    if (beyond.ok) thresholdAt = beyond;
  }
  let thresholdIndex = -1;
  if (thresholdAt.ok) {
    const at = thresholdAt.x / perUnit;
    thresholdIndex = table.findIndex((r) => r.length >= at - 1e-9 * Math.max(1, at));
  }
  const rows = table.map((r, i) => ({ ...r, threshold: i === thresholdIndex, lengthOther: unit === 'in' ? r.lengthCm : cmToIn(r.lengthCm) }));
  const half = Math.ceil(rows.length / 2);
  const columns = rows.length > 36 ? [rows.slice(0, half), rows.slice(half)] : [rows];
  return { unit, step, rows, columns, thresholdKgHa: opts.thresholdKgHa, thresholdLbAc: kgPerHaToLbPerAc(opts.thresholdKgHa), thresholdAt, thresholdIndex };
}
