import type { VerdictReason, VerdictResult } from '../../../shared/calc/verdict';
import { adviceText, biomass, biomassAgainstThreshold, percent, reasonText, type Lang, type UnitSystem } from '../../../shared/format';

/**
 * What the phone shows of a verdict, worded through shared/format so the phone and the office say
 * the same figures (whole lb/ac or kg/ha, more digits only where rounding would contradict the
 * verdict). Pure: the screens only pick colours and the locale strings for `headline`.
 */

export type VerdictState = 'meets' | 'below' | 'borderline';
/** The short headline (locale key estimate.headline.<code>). */
export type Headline = 'meets' | 'below' | 'just_meets' | 'just_below' | 'borderline' | 'borderline_few' | 'borderline_spread';

export interface VerdictView {
  state: VerdictState;
  headline: Headline;
  /** ✓ only for meets, ✗ only for below: a borderline verdict never carries a tick. */
  mark: '✓' | '✗' | '?';
  /** The point estimate, e.g. "5,652 lb/ac" (with decimals only when the threshold is that close). */
  biomass: string;
  threshold: string;
  /** "90% range 3,029–6,241 lb/ac", or null when the spread between plants is unknown. */
  range: string | null;
  spreadKnown: boolean;
  /** What decided it, in the reader's language and units. */
  reasons: string[];
  /** How many more plants (with its power), reach the minimum, or walk again; null unless borderline. */
  advice: string | null;
  /** What did not decide it but must be said (extrapolation; unknown spread under the point basis). */
  cautions: string[];
  /** A stored snapshot outside the calibrated lengths (its numbers are not kept: a plain caution). */
  extrapolatedNote: boolean;
  n: number;
  minPlants: number;
  meanLengthCm: number;
  lengthForThresholdCm: number | null;
}

export const MARKS: Record<VerdictState, VerdictView['mark']> = { meets: '✓', below: '✗', borderline: '?' };

function headlineOf(state: VerdictState, reasons: VerdictReason[], nearness: 'just_below' | 'just_above' | null): Headline {
  if (state === 'borderline') {
    if (reasons.some((r) => r.code === 'too_few_plants')) return 'borderline_few';
    if (reasons.some((r) => r.code === 'unknown_spread')) return 'borderline_spread';
    return 'borderline';
  }
  if (state === 'meets') return nearness ? 'just_meets' : 'meets';
  return nearness ? 'just_below' : 'below';
}

/** The words and figures of a freshly decided verdict (the live estimate). */
export function verdictView(v: VerdictResult, reader: { lang: Lang; units: UnitSystem }): VerdictView {
  const { lang, units } = reader;
  const compared = biomassAgainstThreshold(v.biomassKgHa, v.thresholdKgHa, units, lang);
  const iv = v.combined.interval;
  const range = iv ? rangeText(iv, v.confidence, reader) : null;
  return {
    state: v.verdict,
    headline: headlineOf(v.verdict, v.reasons, compared.nearness),
    mark: MARKS[v.verdict],
    biomass: compared.value.full,
    threshold: compared.threshold.full,
    range,
    spreadKnown: v.combined.spreadKnown,
    reasons: v.reasons.map((r) => reasonText(r, reader)),
    advice: v.morePlants ? adviceText(v.morePlants, reader) : null,
    cautions: v.cautions.filter((c) => c.code === 'extrapolated' || c.code === 'unknown_spread').map((c) => reasonText(c, reader)),
    extrapolatedNote: false,
    n: v.n,
    minPlants: v.minPlants,
    meanLengthCm: v.meanLengthCm,
    lengthForThresholdCm: v.lengthForThresholdCm,
  };
}

/** "90% range 3,029–6,241 lb/ac" / "rango del 90 % 3,029–6,241 lb/ac". */
export function rangeText(iv: [number, number], level: number, reader: { lang: Lang; units: UnitSystem }): string {
  const lo = biomass(iv[0], reader.units, reader.lang).text;
  const hi = biomass(iv[1], reader.units, reader.lang).full;
  return reader.lang === 'es' ? `rango del ${percent(level, 'es')}: ${lo}–${hi}` : `${percent(level, 'en')} range: ${lo}–${hi}`;
}

/** A stored estimate as the server kept it: older snapshots carry no verdict, only meetsThreshold. */
export interface StoredEstimate {
  n: number;
  meanLengthCm: number;
  biomassKgHa: number;
  interval: [number, number];
  level: number;
  thresholdKgHa: number;
  meetsThreshold: boolean;
  extrapolated: boolean;
  verdict?: VerdictState | null;
  combinedInterval?: [number, number] | null;
  reasons?: VerdictReason[] | null;
  morePlants?: VerdictResult['morePlants'];
  minPlants?: number | null;
  confidence?: number | null;
}

/**
 * The server's stored result, worded the same way. A snapshot with a verdict keeps it; an older one
 * keeps the meets/below it was stored with (its note and figures are not re-decided on the phone).
 */
export function storedVerdictView(e: StoredEstimate, reader: { lang: Lang; units: UnitSystem }): VerdictView {
  const state: VerdictState = e.verdict ?? (e.meetsThreshold ? 'meets' : 'below');
  const compared = biomassAgainstThreshold(e.biomassKgHa, e.thresholdKgHa, reader.units, reader.lang);
  const reasons = e.reasons ?? [];
  const iv = e.combinedInterval ?? (e.verdict ? null : e.interval);
  return {
    state,
    headline: headlineOf(state, reasons, state === 'borderline' ? null : compared.atOrAbove === (state === 'meets') ? compared.nearness : null),
    mark: MARKS[state],
    biomass: compared.value.full,
    threshold: compared.threshold.full,
    range: iv ? rangeText(iv, e.confidence ?? e.level, reader) : null,
    spreadKnown: iv !== null,
    reasons: reasons.map((r) => reasonText(r, reader)),
    advice: e.morePlants ? adviceText(e.morePlants, reader) : null,
    cautions: [],
    extrapolatedNote: e.extrapolated,
    n: e.n,
    minPlants: e.minPlants ?? 0,
    meanLengthCm: e.meanLengthCm,
    lengthForThresholdCm: null,
  };
}
