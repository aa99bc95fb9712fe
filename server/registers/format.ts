import { KG_PER_LB, cmToIn, haToAc, kgPerHaToLbPerAc } from '../../shared/calc/units';
import { CROP_LABELS } from '../../shared/registry/crops';
import type { EligibilityReason } from '../../shared/calc/eligibility';
import { DECISION_BASIS_WORDS, eligibilityReasonText } from '../../shared/format/messages';
import { credit, formatNumber } from '../../shared/format/figures';
import { SHOOT_N_CAUTION, shootNitrogenText, verdictWord, walkBiomassText, walkVerdictReasonText, type WalkVerdictReasonData } from '../../shared/format/walk';
import type { Verdict as WalkVerdictWord } from '../../shared/calc/verdict';
import type { Units } from '../people/public';
import type { FinalRegister, Register, RegisterRow, RegisterRule, Verdict } from './service';

/** A register as pages and files show it: a draft computed now, or a finalised version. */
export type RegisterDoc = Register & { status: 'draft' | 'final' } & Partial<
    Pick<FinalRegister, 'id' | 'version' | 'contentHash' | 'previousId' | 'finalisedAt' | 'finalisedBy'>
  >;

export const asDraft = (r: Register): RegisterDoc => ({ ...r, status: 'draft' });
export const asFinal = (r: FinalRegister): RegisterDoc => ({ ...r, status: 'final' });

export const VERDICT_LABELS: Record<Verdict, string> = {
  eligible: 'Eligible',
  not_eligible: 'Not eligible',
  projected_eligible: 'On track (projected)',
  no_planting: 'No cover crop',
};

export const CAUTIONS = [
  'Biomass figures are screening estimates read off a calibration curve from main shoot lengths, not weighed samples.',
  'The local authority’s rule and a licensed adviser decide what is reported; the rule values here are settings an administrator confirmed (or demo values where marked).',
];

export const cropLabel = (crop: string | null) => (crop ? (CROP_LABELS as Record<string, string>)[crop] ?? crop : '—');

/** Numbers in one unit system, for pages, the PDF and e-mails, written by the shared formatter (shared/format/figures.ts). */
export function registerUnits(units: Units) {
  const us = units === 'us';
  const f = {
    units,
    areaUnit: us ? 'ac' : 'ha',
    rateUnit: us ? 'lb/ac' : 'kg/ha',
    lengthUnit: us ? 'in' : 'cm',
    massUnit: us ? 'lb N' : 'kg N',
    num: (n: number, digits = 0) => formatNumber(n, digits),
    area: (ha: number | null | undefined, digits = 1) => (ha == null ? '—' : `${formatNumber(us ? haToAc(ha) : ha, digits)} ${us ? 'ac' : 'ha'}`),
    rate: (kgHa: number | null | undefined) => (kgHa == null ? '—' : `${formatNumber(us ? kgPerHaToLbPerAc(kgHa) : kgHa, 0)} ${us ? 'lb/ac' : 'kg/ha'}`),
    rateNumber: (kgHa: number) => formatNumber(us ? kgPerHaToLbPerAc(kgHa) : kgHa, 0),
    length: (cm: number | null | undefined) => (cm == null ? '—' : `${formatNumber(us ? cmToIn(cm) : cm, 1)} ${us ? 'in' : 'cm'}`),
    /** kg of nitrogen, or pounds in US units, whole units as the shared formatter writes credits everywhere (table, chart, PDF, e-mail). */
    massN: (kg: number | null | undefined) => (kg == null ? '—' : credit(kg, units).full),
    massNumber: (kg: number) => credit(kg, units).text,
    /** kg N as a plain number in the user's unit (lb N in US units), for charts. */
    massValue: (kg: number) => (us ? kg / KG_PER_LB : kg),
    /** Credit per area, e.g. "50.0 lb N/ac". */
    creditRate: (kgHa: number) => `${formatNumber(us ? kgPerHaToLbPerAc(kgHa) : kgHa, 1)} ${us ? 'lb N/ac' : 'kg N/ha'}`,
  };
  return {
    ...f,
    /** "5,120 lb/ac (4,300–6,010, 90 %)". */
    estimate: (row: RegisterRow) =>
      row.walk
        ? `${f.rate(row.walk.biomassKgHa)} (${f.rateNumber(row.walk.interval[0])}–${f.rateNumber(row.walk.interval[1])}, ${Math.round(row.walk.level * 100)} %)`
        : '—',
    verdict: (v: Verdict) => VERDICT_LABELS[v],
    /** The walk's own verdict (meets / below / borderline) and how it was decided; null without a walk. */
    walkVerdict: (row: RegisterRow, rule: RegisterRule) => walkVerdictOfRow(row, rule),
    /** The walk's biomass exactly as the walk page, PDF, CSV and e-mail print it. */
    walkBiomass: (row: RegisterRow, rule: RegisterRule) =>
      row.walk ? walkBiomassText({ biomassKgHa: row.walk.biomassKgHa, thresholdKgHa: row.walk.thresholdKgHa ?? rule.thresholdKgHa }, units) : '—',
    /** N in the shoots with its interval, or '—' without a lab value. */
    shootNCaution: SHOOT_N_CAUTION.en,
    shootN: (row: RegisterRow) => (row.walk?.shootN ? shootNitrogenText(row.walk.shootN.kgNPerHa, row.walk.shootN.interval, units) : '—'),
    /**
     * A reason in the reader's units and crop names, worded afresh from its code and numbers.
     * Versions finalised before reasons kept their numbers fall back to what could be said then.
     */
    reason: (reason: { code: string; message: string; data?: Record<string, unknown> }, row: RegisterRow, rule: RegisterRule) => {
      const reader = { lang: 'en' as const, units };
      if ((reason.code === 'walk_borderline' || reason.code === 'walk_below') && reason.data) {
        return walkVerdictReasonText(reason.data as unknown as WalkVerdictReasonData, reader);
      }
      if (reason.data) return eligibilityReasonText(reason as EligibilityReason, reader, cropLabel);
      if (reason.code === 'below_threshold' && row.walk) {
        return `The estimated biomass, ${f.rate(row.walk.biomassKgHa)}, is below the ${f.rate(rule.thresholdKgHa)} threshold.`;
      }
      if (reason.code === 'crop_not_eligible' && row.crop) {
        return `${cropLabel(row.crop)} is not an eligible crop under this rule (eligible: ${rule.eligibleCrops.map(cropLabel).join(', ') || 'none'}).`;
      }
      return reason.message;
    },
  };
}

export type RegisterUnits = ReturnType<typeof registerUnits>;

export interface RowWalkVerdict {
  verdict: WalkVerdictWord;
  word: string;
  decisionBasis: string;
  basisWords: string;
  ruleVersionId: string | null;
}

/**
 * A row's walk verdict. Versions finalised before walks carried their verdict fall back to the
 * point estimate against the register's threshold, which is what those registers judged by.
 */
export function walkVerdictOfRow(row: RegisterRow, rule: RegisterRule): RowWalkVerdict | null {
  const w = row.walk;
  if (!w) return null;
  const verdict: WalkVerdictWord = w.verdict ?? (w.biomassKgHa >= (w.thresholdKgHa ?? rule.thresholdKgHa) ? 'meets' : 'below');
  const basis = w.decisionBasis ?? 'point';
  return { verdict, word: verdictWord(verdict), decisionBasis: basis, basisWords: DECISION_BASIS_WORDS.en[basis], ruleVersionId: w.ruleVersionId ?? null };
}

export const shortId = (id: string) => id.slice(0, 8);

/** "Crowntip-register-sandpiper-bench-2027-v2" (file names: letters, digits and dashes only). */
export function registerFileStem(doc: { ranch: { name: string }; year: number; status: string; version?: number }): string {
  const slug = doc.ranch.name
    .normalize('NFKD')
    .replace(/[^\w\s-]/g, '')
    .trim()
    .toLowerCase()
    .replace(/[\s_]+/g, '-')
    .replace(/-+/g, '-')
    .slice(0, 60);
  return `crowntip-register-${slug || 'ranch'}-${doc.year}-${doc.status === 'final' ? `v${doc.version}` : 'draft'}`;
}

/**
 * One line per field with a walk, for the e-mail to the grower: the same verdict word and rounded
 * biomass as the walk page, register page, PDF and CSV.
 */
export function registerFieldLines(doc: Pick<Register, 'rows' | 'rule'>, u: RegisterUnits): string[] {
  return doc.rows.flatMap((r) => {
    const wv = walkVerdictOfRow(r, doc.rule);
    if (!r.walk || !wv) return [`${r.fieldName}: ${VERDICT_LABELS[r.verdict]}.`];
    const n = r.walk.shootN ? `; N in the shoots ${u.shootN(r)} (estimate)` : '';
    return [`${r.fieldName}: walk of ${r.walk.walkedOn} ${wv.word}, ${u.walkBiomass(r, doc.rule)}${n}; ${VERDICT_LABELS[r.verdict]}${r.creditKgN && r.verdict === 'eligible' ? `, ${u.massN(r.creditKgN)}` : ''}.`];
  });
}
