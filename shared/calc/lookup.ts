import { CalcError } from './errors';
import type { Fit } from './fit-types';
import { assertFit, predict } from './predict';
import { CM_PER_IN, kgPerHaToLbPerAc } from './units';
import { requireFinite, requirePositive } from './validate';

export interface LookupRow {
  /** Length in the table's unit (in or cm). */
  length: number;
  lengthCm: number;
  biomassKgHa: number;
  biomassLbAc: number;
  /** Outside the calibrated length range. */
  extrapolated: boolean;
}

export interface LookupOptions {
  unit: 'in' | 'cm';
  /** Step in the table's unit, e.g. 1 (in) or 2 (cm). */
  step: number;
  /** Defaults: the calibrated range, rounded inwards to whole steps. */
  from?: number;
  to?: number;
}

export const MAX_LOOKUP_ROWS = 5000;

/** A printable length → biomass table in both unit systems. Biomass is floored at 0 (a straight
 *  line can dip below zero at short lengths; negative biomass is never a reading). */
export function lookupTable(fit: Fit, options: LookupOptions): LookupRow[] {
  assertFit(fit);
  const unit = options?.unit;
  if (unit !== 'in' && unit !== 'cm') throw new CalcError('bad_option', "unit must be 'in' or 'cm'.", 'unit');
  const step = requirePositive(options.step, 'step');
  const perUnit = unit === 'in' ? CM_PER_IN : 1;
  const xLo = fit.xRange[0] / perUnit;
  const xHi = fit.xRange[1] / perUnit;
  let from = options.from === undefined ? Math.ceil(xLo / step - 1e-9) * step : requireFinite(options.from, 'from');
  let to = options.to === undefined ? Math.floor(xHi / step + 1e-9) * step : requireFinite(options.to, 'to');
  if (options.from === undefined && options.to === undefined && from > to) {
    from = xLo; // calibrated range narrower than one step
    to = xHi;
  }
  if (from > to) throw new CalcError('bad_option', '"from" must not be greater than "to".', 'from');
  if (fit.model === 'power' && from <= 0) {
    throw new CalcError('non_positive', 'The power curve starts above zero length: choose "from" greater than 0.', 'from');
  }
  const count = Math.floor((to - from) / step + 1e-9) + 1;
  if (count > MAX_LOOKUP_ROWS) {
    throw new CalcError('too_many_rows', `That table would have ${count} rows; use a larger step or a shorter range.`, 'step');
  }
  const tol = 1e-9 * Math.max(1, fit.xRange[1]);
  const rows: LookupRow[] = new Array(count);
  for (let i = 0; i < count; i++) {
    // Computed from the index (not accumulated) and tidied, so 0.1 steps do not drift.
    const length = Number((from + i * step).toPrecision(12));
    const lengthCm = length * perUnit;
    const kg = Math.max(0, predict(fit, lengthCm));
    rows[i] = {
      length,
      lengthCm,
      biomassKgHa: kg,
      biomassLbAc: kgPerHaToLbPerAc(kg),
      extrapolated: lengthCm < fit.xRange[0] - tol || lengthCm > fit.xRange[1] + tol,
    };
  }
  return rows;
}
