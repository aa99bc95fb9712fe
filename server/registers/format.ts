import { KG_PER_LB, cmToIn, haToAc, kgPerHaToLbPerAc } from '../../shared/calc/units';
import { CROP_LABELS } from '../../shared/registry/crops';
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

/** Numbers in one unit system, for pages, the PDF and e-mails (en-US digits unless a locale is given). */
export function registerUnits(units: Units, locale = 'en-US') {
  const nf = (digits: number) => new Intl.NumberFormat(locale, { minimumFractionDigits: digits, maximumFractionDigits: digits });
  const us = units === 'us';
  const f = {
    units,
    areaUnit: us ? 'ac' : 'ha',
    rateUnit: us ? 'lb/ac' : 'kg/ha',
    lengthUnit: us ? 'in' : 'cm',
    massUnit: us ? 'lb N' : 'kg N',
    num: (n: number, digits = 0) => nf(digits).format(n),
    area: (ha: number | null | undefined, digits = 1) => (ha == null ? '—' : `${nf(digits).format(us ? haToAc(ha) : ha)} ${us ? 'ac' : 'ha'}`),
    rate: (kgHa: number | null | undefined) => (kgHa == null ? '—' : `${nf(0).format(us ? kgPerHaToLbPerAc(kgHa) : kgHa)} ${us ? 'lb/ac' : 'kg/ha'}`),
    rateNumber: (kgHa: number) => nf(0).format(us ? kgPerHaToLbPerAc(kgHa) : kgHa),
    length: (cm: number | null | undefined) => (cm == null ? '—' : `${nf(1).format(us ? cmToIn(cm) : cm)} ${us ? 'in' : 'cm'}`),
    /** kg of nitrogen, or pounds in US units. */
    massN: (kg: number | null | undefined, digits = 1) => (kg == null ? '—' : `${nf(digits).format(us ? kg / KG_PER_LB : kg)} ${us ? 'lb N' : 'kg N'}`),
    massNumber: (kg: number, digits = 1) => nf(digits).format(us ? kg / KG_PER_LB : kg),
    /** kg N as a plain number in the user's unit (lb N in US units), for charts. */
    massValue: (kg: number) => (us ? kg / KG_PER_LB : kg),
    /** Credit per area, e.g. "50.0 lb N/ac". */
    creditRate: (kgHa: number) => `${nf(1).format(us ? kgPerHaToLbPerAc(kgHa) : kgHa)} ${us ? 'lb N/ac' : 'kg N/ha'}`,
  };
  return {
    ...f,
    /** "5,120 lb/ac (4,300–6,010, 90 %)". */
    estimate: (row: RegisterRow) =>
      row.walk
        ? `${f.rate(row.walk.biomassKgHa)} (${f.rateNumber(row.walk.interval[0])}–${f.rateNumber(row.walk.interval[1])}, ${Math.round(row.walk.level * 100)} %)`
        : '—',
    verdict: (v: Verdict) => VERDICT_LABELS[v],
    /**
     * A reason in the reader's units and crop names. The snapshot keeps the core's own words (SI
     * units, crop codes); the two reasons that carry a number or a code are said again here.
     */
    reason: (reason: { code: string; message: string }, row: RegisterRow, rule: RegisterRule) => {
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
