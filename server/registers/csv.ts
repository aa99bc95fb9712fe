import { KG_PER_LB, cmToIn, haToAc, kgPerHaToLbPerAc } from '../../shared/calc/units';
import { toCsv } from '../platform/csv-safe';
import type { Units } from '../people/public';
import { SHOOT_N_CAUTION } from '../../shared/format/walk';
import { VERDICT_LABELS, cropLabel, registerUnits, walkVerdictOfRow, type RegisterDoc, type RegisterUnits } from './format';
import type { RegisterRow, RegisterTotals } from './service';

/*
 * A register as CSV: one row per field and a totals row per register (columns documented in the
 * README), for one register or many (the organisation's register is every ranch's, one after the
 * other). The PDF is pdf.ts.
 */

export const REGISTER_CSV_COLUMNS = [
  'ranch',
  'year',
  'season',
  'status',
  'version',
  'content_hash',
  'field',
  'area_ha',
  'area_ac',
  'crop',
  'crop_name',
  'variety',
  'seeded_on',
  'terminated_on',
  'projected',
  'counted_to',
  'days_in_window',
  'walk_id',
  'walk_qualifies',
  'walked_on',
  'plants',
  'mean_length_cm',
  'mean_length_in',
  'biomass_kg_ha',
  'biomass_lb_ac',
  'interval_low_kg_ha',
  'interval_high_kg_ha',
  'interval_level',
  'calibration_id',
  'calibration_version',
  'extrapolated',
  'biomass_shown',
  'verdict',
  'decision_basis',
  'rule_version',
  'walk_threshold_kg_ha',
  'tissue_n_percent',
  'shoot_n_kg_ha',
  'shoot_n_low_kg_ha',
  'shoot_n_high_kg_ha',
  'shoot_n_lb_ac',
  'shoot_n_shown',
  'credit_status',
  'eligible_area_ha',
  'credit_kg_n',
  'credit_lb_n',
  'reasons',
] as const;

const round = (n: number | null | undefined, digits: number) => (n == null ? null : Number(n.toFixed(digits)));

function csvRow(doc: RegisterDoc, r: RegisterRow, u: RegisterUnits): unknown[] {
  const w = r.walk;
  const wv = walkVerdictOfRow(r, doc.rule);
  const n = w?.shootN ?? null;
  return [
    doc.ranch.name,
    doc.year,
    doc.season,
    doc.status,
    doc.version ?? '',
    doc.contentHash ?? '',
    r.fieldName,
    round(r.areaHa, 4),
    round(haToAc(r.areaHa), 2),
    r.crop ?? '',
    r.crop ? cropLabel(r.crop) : '',
    r.variety ?? '',
    r.seededOn ?? '',
    r.terminatedOn ?? '',
    r.projected,
    r.endOn ?? '',
    r.daysInWindow,
    w?.id ?? '',
    w ? r.walkQualifies : '',
    w?.walkedOn ?? '',
    w?.n ?? null,
    round(w?.meanLengthCm, 1),
    w ? round(cmToIn(w.meanLengthCm), 1) : null,
    round(w?.biomassKgHa, 0),
    w ? round(kgPerHaToLbPerAc(w.biomassKgHa), 0) : null,
    round(w?.interval[0], 0),
    round(w?.interval[1], 0),
    w?.level ?? null,
    w?.calibrationId ?? '',
    w ? String(w.calibrationVersion) : '',
    w ? w.extrapolated : '',
    w ? u.walkBiomass(r, doc.rule) : '',
    wv?.verdict ?? '',
    wv?.decisionBasis ?? '',
    wv?.ruleVersionId ?? '',
    w ? round(w.thresholdKgHa ?? doc.rule.thresholdKgHa, 2) : null,
    w?.tissueNPercent ?? null,
    n ? round(n.kgNPerHa, 1) : null,
    n?.interval ? round(n.interval[0], 1) : null,
    n?.interval ? round(n.interval[1], 1) : null,
    n ? round(kgPerHaToLbPerAc(n.kgNPerHa), 1) : null,
    n ? u.shootN(r) : '',
    r.verdict,
    r.verdict === 'eligible' ? round(r.areaHa, 4) : 0,
    round(r.creditKgN, 3),
    round(r.creditKgN / KG_PER_LB, 3),
    r.reasons.map((x) => u.reason(x, r, doc.rule)).join(' | '),
  ];
}

function csvTotals(doc: RegisterDoc, t: RegisterTotals): unknown[] {
  const row: unknown[] = REGISTER_CSV_COLUMNS.map(() => '');
  const set = (col: (typeof REGISTER_CSV_COLUMNS)[number], v: unknown) => (row[REGISTER_CSV_COLUMNS.indexOf(col)] = v);
  set('ranch', doc.ranch.name);
  set('year', doc.year);
  set('season', doc.season);
  set('status', doc.status);
  set('version', doc.version ?? '');
  set('content_hash', doc.contentHash ?? '');
  set('field', 'TOTAL');
  set('area_ha', round(t.totalAreaHa, 4));
  set('area_ac', round(haToAc(t.totalAreaHa), 2));
  set('credit_status', `${t.eligibleFields} of ${t.fields} fields eligible`);
  set('eligible_area_ha', round(t.eligibleAreaHa, 4));
  set('credit_kg_n', round(t.creditKgN, 3));
  set('credit_lb_n', round(t.creditKgN / KG_PER_LB, 3));
  const notes = [
    t.projectedFields ? `${t.projectedFields} field(s) not yet terminated are projected and not counted; they would add ${round(t.projectedCreditKgN, 1)} kg N` : '',
    doc.rows.some((r) => r.walk?.shootN) ? SHOOT_N_CAUTION.en : '',
  ];
  set('reasons', notes.filter(Boolean).join(' | '));
  return row;
}

/**
 * One CSV for one or many registers: each field's row, then that register's totals row. Stored
 * values stay SI; `biomass_shown`, `shoot_n_shown` and the reasons are in the reader's units.
 */
export function registerCsv(docs: RegisterDoc[], units: Units = 'us'): string {
  const u = registerUnits(units);
  return toCsv(docs.flatMap((d) => csvRowsOf(d, u)), REGISTER_CSV_COLUMNS);
}

/** The same CSV written one register at a time, letting the event loop run between them (a building server keeps answering). */
export async function registerCsvInSteps(docs: RegisterDoc[], units: Units, between: () => Promise<void>): Promise<string> {
  const u = registerUnits(units);
  const parts = [toCsv([], REGISTER_CSV_COLUMNS)];
  for (const d of docs) {
    parts.push(toCsv(csvRowsOf(d, u), REGISTER_CSV_COLUMNS, { bom: false, header: false }));
    await between();
  }
  return parts.join('');
}

const csvRowsOf = (d: RegisterDoc, u: RegisterUnits) => [...d.rows.map((r) => csvRow(d, r, u)), csvTotals(d, d.totals)];
