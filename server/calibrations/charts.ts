import { cmToIn, interval, kgPerHaToLbPerAc, lengthForBiomass, predict, type Fit, type LengthForBiomassResult } from '../../shared/calc';
import { renderChart, type ChartPoint } from '../../shared/charts/svg';
import { formatNumber } from '../../shared/format/figures';
import type { DatasetPoint } from './db';

/*
 * The fit page's two charts, in the reader's units: the points with the chosen curve, its 90 %
 * prediction band, the threshold line and where the curve reaches it; and the residuals against
 * the fitted values. Rendered on the server as SVG (shared/charts/svg.ts), so they print.
 */

export interface DisplayUnits {
  length: 'in' | 'cm';
  biomass: 'lb_ac' | 'kg_ha';
}

export const displayUnitsOf = (units: 'us' | 'metric'): DisplayUnits =>
  units === 'us' ? { length: 'in', biomass: 'lb_ac' } : { length: 'cm', biomass: 'kg_ha' };

export const lengthOut = (cm: number, u: DisplayUnits) => (u.length === 'in' ? cmToIn(cm) : cm);
export const biomassOut = (kgHa: number, u: DisplayUnits) => (u.biomass === 'lb_ac' ? kgPerHaToLbPerAc(kgHa) : kgHa);
export const lengthUnitLabel = (u: DisplayUnits) => u.length;
export const biomassUnitLabel = (u: DisplayUnits) => (u.biomass === 'lb_ac' ? 'lb/ac' : 'kg/ha');

/** Prediction band level of the charts and the fit page. */
export const BAND_LEVEL = 0.9;

export interface ChartInput {
  /** Unique on the page. */
  id: string;
  fit: Fit;
  points: Pick<DatasetPoint, 'x' | 'y'>[];
  units: DisplayUnits;
  thresholdKgHa: number;
  /** "Cereal rye, power model", for the titles. */
  subject: string;
}

export interface CalibrationCharts {
  scatter: string;
  residuals: string;
  thresholdAt: LengthForBiomassResult;
}

/** Curve samples across the calibrated range (where the band is meaningful). */
function samples(fit: Fit, count = 120): number[] {
  const [lo, hi] = fit.xRange;
  return Array.from({ length: count + 1 }, (_, i) => lo + ((hi - lo) * i) / count);
}

export function calibrationCharts(input: ChartInput): CalibrationCharts {
  const { fit, units: u } = input;
  const lenUnit = lengthUnitLabel(u);
  const bioUnit = biomassUnitLabel(u);
  const xs = samples(fit);
  const curve: ChartPoint[] = xs.map((x) => ({ x: lengthOut(x, u), y: biomassOut(Math.max(0, predict(fit, x)), u) }));
  const bands = xs.map((x) => interval(fit, x, { level: BAND_LEVEL, kind: 'prediction' }));
  // Biomass is never negative: a straight line's band may dip below zero at short lengths.
  const lower = xs.map((x, i) => ({ x: lengthOut(x, u), y: biomassOut(Math.max(0, bands[i]![0]), u) }));
  const upper = xs.map((x, i) => ({ x: lengthOut(x, u), y: biomassOut(Math.max(0, bands[i]![1]), u) }));
  const pts = input.points.map((p) => ({ x: lengthOut(p.x, u), y: biomassOut(p.y, u) }));
  const threshold = biomassOut(input.thresholdKgHa, u);
  const thresholdAt = lengthForBiomass(fit, input.thresholdKgHa);
  const thresholdText = `${formatNumber(threshold)} ${bioUnit}`;
  const reach = thresholdAt.ok ? lengthOut(thresholdAt.x, u) : null;

  const layers: Parameters<typeof renderChart>[0]['layers'] = [
    { kind: 'band', label: `${Math.round(BAND_LEVEL * 100)} % prediction band`, lower, upper },
    { kind: 'points', label: `Paired samples (n = ${fit.n})`, points: pts },
    { kind: 'line', label: `${input.subject} curve`, points: curve },
    { kind: 'hline', label: `Threshold ${thresholdText}`, y: threshold },
  ];
  if (reach !== null) {
    layers.push({ kind: 'marker', label: 'Length reaching the threshold', x: reach, y: threshold, text: `${formatNumber(reach, 1)} ${lenUnit}` });
  }
  const reachWords =
    reach !== null
      ? `The curve reaches the threshold of ${thresholdText} at a mean main shoot length of ${formatNumber(reach, 1)} ${lenUnit}.`
      : `The curve does not reach the threshold of ${thresholdText} within the calibrated lengths.`;
  const xLo = lengthOut(fit.xRange[0], u);
  const xHi = lengthOut(fit.xRange[1], u);
  const scatter = renderChart({
    id: `${input.id}-scatter`,
    title: `${input.subject}: biomass against mean main shoot length`,
    description: `${fit.n} paired samples from ${formatNumber(xLo, 1)} to ${formatNumber(xHi, 1)} ${lenUnit}, the fitted curve (${fit.equation}, x in cm, y in kg/ha) and its ${Math.round(BAND_LEVEL * 100)} % prediction band. ${reachWords}`,
    xAxis: { label: `Mean main shoot length (${lenUnit})`, include: 0 },
    yAxis: { label: `Oven-dry shoot biomass (${bioUnit})`, include: 0 },
    layers,
    className: 'w-full h-auto',
  });

  const resid = input.points.map((p) => {
    const fitted = predict(fit, p.x);
    return { x: biomassOut(fitted, u), y: biomassOut(p.y, u) - biomassOut(fitted, u) };
  });
  const maxAbs = Math.max(1, ...resid.map((r) => Math.abs(r.y)));
  const residuals = renderChart({
    id: `${input.id}-residuals`,
    title: `${input.subject}: residuals against fitted biomass`,
    description: `Observed minus fitted biomass (${bioUnit}) for each of the ${fit.n} samples, against the fitted biomass. Points should scatter evenly around zero; a funnel or a bend means the model misses the shape.`,
    xAxis: { label: `Fitted biomass (${bioUnit})`, include: 0 },
    yAxis: { label: `Observed − fitted (${bioUnit})`, include: 0 },
    layers: [
      { kind: 'hline', label: 'Zero', y: 0, style: 'zero' },
      { kind: 'points', label: 'Residual of a sample', points: resid },
      // Symmetric range so the eye judges above and below alike.
      { kind: 'points', label: '', points: [{ x: NaN, y: -maxAbs }, { x: NaN, y: maxAbs }] },
    ],
    height: 300,
    className: 'w-full h-auto',
  });
  return { scatter, residuals, thresholdAt };
}
