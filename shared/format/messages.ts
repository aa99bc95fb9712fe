import type { EligibilityReason } from '../calc/eligibility';
import type { DecisionBasis } from '../calc/rules';
import type { MorePlantsAdvice, Verdict, VerdictReason, VerdictResult } from '../calc/verdict';
import { biomass, biomassAgainstThreshold, date, length, percent, type Lang, type UnitSystem } from './figures';

/*
 * Words for a verdict, built from its reason codes and SI numbers in the reader's language and
 * units. Nothing here is stored: a stored verdict keeps codes and numbers, and every screen, print
 * and e-mail words them afresh for its reader.
 */

export interface Reader {
  lang: Lang;
  units: UnitSystem;
}

export const VERDICT_WORDS: Record<Lang, Record<Verdict, string>> = {
  en: { meets: 'Meets', below: 'Below', borderline: 'Borderline' },
  es: { meets: 'Cumple', below: 'No cumple', borderline: 'En el límite' },
};

/** Short names of the decision bases, for labels beside a verdict. */
export const DECISION_BASIS_NAMES: Record<Lang, Record<DecisionBasis, string>> = {
  en: { point: 'point estimate', lower_bound: 'low end of the range', point_with_borderline: 'point estimate, borderline when the range spans the threshold' },
  es: { point: 'estimación puntual', lower_bound: 'extremo bajo del rango', point_with_borderline: 'estimación puntual, en el límite si el rango cruza el umbral' },
};

/** Plain words for each decision basis (the rule page shows them; the local authority must agree to the choice). */
export const DECISION_BASIS_WORDS: Record<Lang, Record<DecisionBasis, string>> = {
  en: {
    point: 'The estimate itself decides: at or above the threshold meets, below it does not.',
    lower_bound:
      'The field meets only when the low end of its range (one-sided, at the rule\'s confidence) is at or above the threshold. Safest for the water; more fields need a second walk.',
    point_with_borderline:
      'The estimate decides, but when its range (at the rule\'s confidence) spans the threshold the walk is borderline: walk again or measure more plants before it counts.',
  },
  es: {
    point: 'Decide la estimación: igual o por encima del umbral cumple; por debajo, no.',
    lower_bound:
      'El campo cumple solo cuando el extremo bajo de su rango (unilateral, con la confianza de la regla) está en el umbral o por encima. Lo más seguro para el agua; más campos necesitan un segundo recorrido.',
    point_with_borderline:
      'Decide la estimación, pero si su rango (con la confianza de la regla) cruza el umbral, el recorrido queda en el límite: recorra de nuevo o mida más plantas antes de que cuente.',
  },
};

function plants(n: number, lang: Lang): string {
  return lang === 'es' ? `${n} planta${n === 1 ? '' : 's'}` : `${n} plant${n === 1 ? '' : 's'}`;
}

/** One reason in a sentence. */
export function reasonText(r: VerdictReason, reader: Reader): string {
  const { lang, units } = reader;
  const es = lang === 'es';
  const b = (kg: number) => biomass(kg, units, lang).full;
  switch (r.code) {
    case 'point_meets':
    case 'point_below': {
      const c = biomassAgainstThreshold(r.biomassKgHa, r.thresholdKgHa, units, lang);
      const just = c.nearness ? (es ? 'apenas ' : 'just ') : '';
      if (r.code === 'point_meets') {
        return es
          ? `La estimación, ${c.value.full}, está ${just}${c.nearness ? 'por encima del' : 'en o por encima del'} umbral de ${c.threshold.full}.`
          : `The estimate, ${c.value.full}, is ${just}${c.nearness ? 'above' : 'at or above'} the ${c.threshold.full} threshold.`;
      }
      return es
        ? `La estimación, ${c.value.full}, está ${just}por debajo del umbral de ${c.threshold.full}.`
        : `The estimate, ${c.value.full}, is ${just}below the ${c.threshold.full} threshold.`;
    }
    case 'lower_bound_meets':
    case 'lower_bound_below': {
      const c = biomassAgainstThreshold(r.lowerBoundKgHa, r.thresholdKgHa, units, lang);
      const pct = percent(r.confidence, lang);
      if (r.code === 'lower_bound_meets') {
        return es
          ? `El extremo bajo del rango (${pct}, unilateral), ${c.value.full}, está en o por encima del umbral de ${c.threshold.full}.`
          : `The low end of the range (${pct}, one-sided), ${c.value.full}, is at or above the ${c.threshold.full} threshold.`;
      }
      return es
        ? `El extremo bajo del rango (${pct}, unilateral), ${c.value.full}, está por debajo del umbral de ${c.threshold.full}.`
        : `The low end of the range (${pct}, one-sided), ${c.value.full}, is below the ${c.threshold.full} threshold.`;
    }
    case 'interval_spans_threshold':
    case 'interval_above_threshold':
    case 'interval_below_threshold': {
      const pct = percent(r.level, lang);
      const range = `${biomass(r.lowKgHa, units, lang).text}–${b(r.highKgHa)}`;
      const t = b(r.thresholdKgHa);
      if (r.code === 'interval_spans_threshold') {
        return es
          ? `El rango del ${pct} (${range}) cruza el umbral de ${t}: otro recorrido del mismo campo podría dar el otro resultado.`
          : `The ${pct} range (${range}) spans the ${t} threshold: another walk of the same field could give the other verdict.`;
      }
      const above = r.code === 'interval_above_threshold';
      return es
        ? `El rango del ${pct} (${range}) queda ${above ? 'por encima' : 'por debajo'} del umbral de ${t}.`
        : `The ${pct} range (${range}) lies ${above ? 'above' : 'below'} the ${t} threshold.`;
    }
    case 'too_few_plants':
      return es
        ? `Solo se midieron ${plants(r.n, lang)}; la regla pide al menos ${r.minPlants}.`
        : `Only ${plants(r.n, lang)} measured; the rule asks for at least ${r.minPlants}.`;
    case 'unknown_spread':
      return r.n < 2
        ? es
          ? 'Con una sola planta no se conoce la variación entre plantas.'
          : 'With one plant the spread between plants is unknown.'
        : es
          ? 'Todas las longitudes son iguales, así que no se conoce la variación entre plantas: revise lo anotado.'
          : 'All lengths are the same, so the spread between plants is unknown: check the entries.';
    case 'extrapolated':
      return es
        ? `La longitud media (${length(r.meanLengthCm, units, lang).full}) está fuera de las longitudes de la calibración (${length(r.calibratedCm[0], units, lang).text}–${length(r.calibratedCm[1], units, lang).full}): es una extrapolación.`
        : `The mean length (${length(r.meanLengthCm, units, lang).full}) is outside the calibrated lengths (${length(r.calibratedCm[0], units, lang).text}–${length(r.calibratedCm[1], units, lang).full}): an extrapolation.`;
  }
}

/** The "measure more plants" advice in a sentence. */
export function adviceText(a: MorePlantsAdvice, reader: Reader): string {
  const es = reader.lang === 'es';
  switch (a.kind) {
    case 'measure_more':
      return es
        ? `Unas ${a.more} plantas más darían un ${percent(a.power, 'es')} de probabilidad de decidirlo.`
        : `About ${a.more} more plant${a.more === 1 ? '' : 's'} would give ${/^(8|11|18)/.test(percent(a.power, 'en')) ? 'an' : 'a'} ${percent(a.power, 'en')} chance of settling it.`;
    case 'reach_minimum':
      return es
        ? `Mida ${a.more} planta${a.more === 1 ? '' : 's'} más para llegar al mínimo de ${a.minPlants}.`
        : `Measure ${a.more} more plant${a.more === 1 ? '' : 's'} to reach the minimum of ${a.minPlants}.`;
    case 'spread_unknown':
      return es
        ? 'Revise las longitudes anotadas y mida al menos una planta más para conocer la variación.'
        : 'Check the lengths entered and measure at least one more plant to learn the spread.';
    case 'walk_again':
      return es
        ? `Harían falta más de ${a.maxPlants} plantas; es mejor recorrer el campo de nuevo más adelante, cuando el cultivo haya crecido.`
        : `It would take more than ${a.maxPlants} plants; better to walk the field again later, when the crop has grown.`;
    case 'calibration_spans_threshold':
      return es
        ? 'La dispersión de la propia calibración cruza el umbral: más plantas no lo decidirán. Solo una muestra cortada y pesada puede hacerlo.'
        : 'The calibration\'s own scatter spans the threshold: more plants will not settle it. Only a clipped and weighed sample can.';
  }
}

/** The verdict word, its reasons and the advice, as one paragraph for the reader. */
export function verdictSentence(v: VerdictResult, reader: Reader): string {
  const parts = [`${VERDICT_WORDS[reader.lang][v.verdict]}.`, ...v.reasons.map((r) => reasonText(r, reader))];
  if (v.morePlants) parts.push(adviceText(v.morePlants, reader));
  for (const c of v.cautions) if (c.code === 'extrapolated' || c.code === 'unknown_spread') parts.push(reasonText(c, reader));
  return parts.join(' ');
}

/**
 * A credit-eligibility reason in the reader's language and units, from its code and data. Reasons
 * stored without data (before it existed) fall back to their stored English message.
 * `cropName` turns a crop class code into the reader's word for it.
 */
export function eligibilityReasonText(r: EligibilityReason, reader: Reader, cropName: (code: string) => string = (c) => c): string {
  const d = r.data;
  if (!d) return r.message;
  const { lang, units } = reader;
  const es = lang === 'es';
  switch (r.code) {
    case 'crop_not_eligible': {
      const list = (d.eligibleCrops ?? []).map(cropName).join(', ') || (es ? 'ninguno' : 'none');
      return es
        ? `El cultivo «${cropName(d.crop ?? '')}» no es elegible con esta regla (elegibles: ${list}).`
        : `The crop "${cropName(d.crop ?? '')}" is not eligible under this rule (eligible: ${list}).`;
    }
    case 'too_few_days_in_window':
      if (d.projected) {
        return es
          ? `Al ${date(d.endOn as string, lang)} el cultivo lleva ${d.days} días dentro del periodo de lluvias; la regla pide ${d.minDays}.`
          : `As of ${date(d.endOn as string, lang)} the crop has grown ${d.days} days inside the rainy window; the rule needs ${d.minDays}.`;
      }
      return es
        ? `El cultivo creció ${d.days} días dentro del periodo de lluvias; la regla pide ${d.minDays}.`
        : `The crop grew ${d.days} days inside the rainy window; the rule needs ${d.minDays}.`;
    case 'below_threshold': {
      const c = biomassAgainstThreshold(d.biomassKgHa as number, d.thresholdKgHa as number, units, lang);
      const just = c.nearness ? (es ? 'apenas ' : 'just ') : '';
      return es
        ? `La biomasa estimada, ${c.value.full}, está ${just}por debajo del umbral de ${c.threshold.full}.`
        : `The estimated biomass, ${c.value.full}, is ${just}below the ${c.threshold.full} threshold.`;
    }
    case 'sample_after_termination':
      return es
        ? `La muestra se tomó el ${date(d.walkedOn as string, lang)}, después de ${d.projected ? 'la fecha de proyección' : 'la terminación'} (${date(d.endOn as string, lang)}).`
        : `The sample was taken on ${date(d.walkedOn as string, lang)}, after ${d.projected ? 'the projection date' : 'termination'} (${date(d.endOn as string, lang)}).`;
    case 'sample_too_early':
      return es
        ? `La muestra se tomó ${d.gapDays} días antes de ${d.projected ? 'la fecha de proyección' : 'la terminación'}; la regla permite como máximo ${d.maxGapDays}.`
        : `The sample was taken ${d.gapDays} days before ${d.projected ? 'the projection date' : 'termination'}; the rule allows at most ${d.maxGapDays}.`;
    default:
      return es && r.code === 'no_end_date'
        ? 'Aún no hay fecha de terminación, así que no se pueden contar los días dentro del periodo de lluvias.'
        : es && r.code === 'no_estimate'
          ? 'Aún no hay estimación de biomasa: hace falta recorrer el campo.'
          : r.message;
  }
}
