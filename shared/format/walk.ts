import type { DecisionBasis } from '../calc/rules';
import type { MorePlantsAdvice, Verdict, VerdictReason } from '../calc/verdict';
import { biomassAgainstThreshold, date, nitrogenRate, type Lang, type UnitSystem } from './figures';
import { VERDICT_WORDS, adviceText, reasonText, type Reader } from './messages';

/*
 * A walk's verdict as every output reads it (walk page, register page, PDF, CSV, e-mail), from the
 * estimate snapshot stored with the walk. New snapshots carry `verdict`, `decisionBasis`,
 * `ruleVersionId` and `combinedInterval`; snapshots stored before them only know whether the point
 * estimate met the threshold, which is the `point` basis.
 */

/** The parts of a stored estimate snapshot this reads (older snapshots lack the optional ones). */
export interface StoredEstimate {
  biomassKgHa: number;
  thresholdKgHa: number;
  meetsThreshold: boolean;
  interval?: readonly [number, number] | number[];
  verdict?: Verdict | null;
  decisionBasis?: DecisionBasis | null;
  ruleVersionId?: string | null;
  combinedInterval?: readonly [number, number] | number[] | null;
  reasons?: VerdictReason[] | null;
  morePlants?: MorePlantsAdvice | null;
}

export interface WalkVerdict {
  verdict: Verdict;
  decisionBasis: DecisionBasis;
  /** null for snapshots stored before rule versions were recorded with them. */
  ruleVersionId: string | null;
  /** kg/ha; null for old snapshots. */
  combinedInterval: [number, number] | null;
  /** What decided it (codes and SI numbers); empty for old snapshots. */
  reasons: VerdictReason[];
  morePlants: MorePlantsAdvice | null;
  /** False when read back from an old snapshot's meets/below. */
  stored: boolean;
}

const VERDICTS: readonly Verdict[] = ['meets', 'below', 'borderline'];

export function walkVerdictOf(e: StoredEstimate): WalkVerdict {
  if (e.verdict && VERDICTS.includes(e.verdict)) {
    const ci = e.combinedInterval;
    return {
      verdict: e.verdict,
      decisionBasis: e.decisionBasis ?? 'point',
      ruleVersionId: e.ruleVersionId ?? null,
      combinedInterval: ci && ci.length === 2 ? [Number(ci[0]), Number(ci[1])] : null,
      reasons: Array.isArray(e.reasons) ? e.reasons : [],
      morePlants: e.morePlants ?? null,
      stored: true,
    };
  }
  return {
    verdict: e.meetsThreshold ? 'meets' : 'below',
    decisionBasis: 'point',
    ruleVersionId: null,
    combinedInterval: null,
    reasons: [],
    morePlants: null,
    stored: false,
  };
}

/**
 * The walk's biomass as every output prints it: compared with the threshold the walk was judged
 * by, so that a figure never contradicts the verdict ("4,496 lb/ac", never "4,500", below 4,500).
 */
export function walkBiomassText(e: Pick<StoredEstimate, 'biomassKgHa' | 'thresholdKgHa'>, units: UnitSystem, lang: Lang = 'en'): string {
  return biomassAgainstThreshold(e.biomassKgHa, e.thresholdKgHa, units, lang).value.full;
}

/** The verdict word for a reader: "Meets", "Below", "Borderline". */
export const verdictWord = (v: Verdict, lang: Lang = 'en') => VERDICT_WORDS[lang][v];

/** "120 lb N/ac (96–144)": N in the shoots with its interval, in the reader's units. */
export function shootNitrogenText(kgNPerHa: number, interval: readonly [number, number] | null, units: UnitSystem, lang: Lang = 'en'): string {
  const f = nitrogenRate(kgNPerHa, units, lang);
  if (!interval) return f.full;
  return `${f.full} (${nitrogenRate(interval[0], units, lang).text}–${nitrogenRate(interval[1], units, lang).text})`;
}

/** The caution that goes with every N-in-the-shoots figure. */
export const SHOOT_N_CAUTION: Record<Lang, string> = {
  en: 'Nitrogen in the shoots is an estimate (estimated biomass × the lab’s tissue N %); the lab value and the local authority’s rule decide.',
  es: 'El nitrógeno en los brotes es una estimación (biomasa estimada × el % de N del laboratorio); decide el valor del laboratorio y la regla de la autoridad local.',
};

/** Why a register row's walk did not earn the credit though the row's other conditions may hold. */
export interface WalkVerdictReasonData {
  walkedOn: string;
  verdict: Verdict;
  reasons: VerdictReason[];
  morePlants: MorePlantsAdvice | null;
}

/**
 * "The approved walk of Mar 7, 2027 is borderline: the 90% range (…) spans the 4,500 lb/ac
 * threshold …": a register row's walk-verdict reason in the reader's words and units.
 */
export function walkVerdictReasonText(d: WalkVerdictReasonData, reader: Reader): string {
  const es = reader.lang === 'es';
  const when = date(d.walkedOn, reader.lang);
  const head = es
    ? `El recorrido aprobado del ${when} ${d.verdict === 'borderline' ? 'está en el límite' : 'no cumple con la base de decisión de la regla'}`
    : `The approved walk of ${when} is ${d.verdict === 'borderline' ? 'borderline' : 'below under the rule’s decision basis'}`;
  const why = d.reasons.map((r) => reasonText(r, reader));
  if (d.morePlants) why.push(adviceText(d.morePlants, reader));
  const tail = d.verdict === 'borderline' ? (es ? 'No gana el crédito hasta que se decida.' : 'It does not earn the credit until it is settled.') : '';
  return [why.length ? `${head}: ${why.join(' ')}` : `${head}.`, tail].filter(Boolean).join(' ');
}
