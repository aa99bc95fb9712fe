import { inToCm, lbPerAcToKgPerHa } from '../../shared/calc';
import { CsvReadError, readCsvText, type CsvTable } from '../platform/csv-read';
import { formatUpTo } from '../../shared/format/figures';
import { BIOMASS_UNITS, LENGTH_UNITS, type BiomassUnit, type DatasetPoint, type LengthUnit } from './db';

/*
 * Calibration points from a CSV: which column is what, which unit each number is in, every row
 * checked, everything converted to storage units (cm, kg/ha). All or nothing: a file with any row
 * error saves nothing, and the preview lists each error with its line.
 *
 * Columns (header names, any case; spaces, slashes and brackets count as "_"):
 *   length   a name containing "length", e.g. length_cm, length_in, "Mean length (in)"   required
 *   biomass  a name containing "biomass" or "dry_matter", e.g. biomass_kg_ha, biomass_lb_ac,
 *            biomass_g_m2                                                               required
 *   site (or plot, field), date (YYYY-MM-DD), stage (or growth_stage, zadoks, feekes),
 *   note (or notes, comment)                                                            optional
 * Units: the header hints them (cm / in; kg_ha / lb_ac / g_m2); the preview form confirms or
 * overrides. 1 in = 2.54 cm; 1 lb/ac = 1.12085 kg/ha; 1 g/m² = 10 kg/ha exactly.
 */

export const MAX_UPLOAD_BYTES = 2 * 1024 * 1024;
export const MAX_POINTS = 10_000;
export const MIN_POINTS = 4;
/** Plausibility limits in storage units: a typed-in unit mistake lands far outside these. */
export const MAX_LENGTH_CM = 300;
export const MAX_BIOMASS_KG_HA = 40_000;
const MAX_ERRORS_KEPT = 200;

export const LENGTH_UNIT_LABELS: Record<LengthUnit, string> = { cm: 'cm', in: 'in' };
export const BIOMASS_UNIT_LABELS: Record<BiomassUnit, string> = { kg_ha: 'kg/ha', lb_ac: 'lb/ac', g_m2: 'g/m²' };

export const toCm = (v: number, unit: LengthUnit) => (unit === 'in' ? inToCm(v) : v);
export function toKgHa(v: number, unit: BiomassUnit): number {
  if (unit === 'lb_ac') return lbPerAcToKgPerHa(v);
  if (unit === 'g_m2') return v * 10; // 1 g/m² = 10,000 g/ha = 10 kg/ha
  return v;
}

type Role = 'length' | 'biomass' | 'site' | 'date' | 'stage' | 'note';

export interface ColumnMap {
  length: number;
  biomass: number;
  site?: number;
  date?: number;
  stage?: number;
  note?: number;
}

export interface ColumnInfo {
  header: string;
  role: Role | null;
}

export interface RowError {
  line: number;
  message: string;
}

export interface ImportCheck {
  /** A problem with the file as a whole (not UTF-8, no length column…); then nothing else is filled. */
  fileError: string | null;
  delimiter: ',' | ';' | null;
  columns: ColumnInfo[];
  /** Units the header names suggest. */
  hints: { lengthUnit: LengthUnit | null; biomassUnit: BiomassUnit | null };
  /** Units used for this check (chosen, else hinted); null when neither. */
  lengthUnit: LengthUnit | null;
  biomassUnit: BiomassUnit | null;
  /** Unit choices still missing, by form field. */
  unitErrors: Partial<Record<'lengthUnit' | 'biomassUnit', string>>;
  rowCount: number;
  /** Converted points (those rows that passed). */
  points: DatasetPoint[];
  errors: RowError[];
  /** All errors, also those beyond the ones kept. */
  errorCount: number;
  /** Problems with the set as a whole (too few points…). */
  setErrors: string[];
  /** True when every row is good, both units are known and the set can be fitted. */
  ok: boolean;
}

/** "Mean length (in)" → "mean_length_in"; "g/m²" → "g_m2". */
export function normaliseHeader(h: string): string {
  return h
    .toLowerCase()
    .replace(/²/g, '2')
    .replace(/[^a-z0-9]+/g, '_')
    .replace(/^_+|_+$/g, '');
}

function roleOf(name: string): Role | null {
  const tokens = name.split('_');
  if (name.includes('length')) return 'length';
  if (name.includes('biomass') || name.includes('dry_matter') || name.includes('drymatter')) return 'biomass';
  if (['site', 'plot', 'field', 'site_name', 'plot_id'].includes(name)) return 'site';
  if (['date', 'sampled_on', 'sampling_date', 'sample_date'].includes(name)) return 'date';
  if (['stage', 'growth_stage', 'zadoks', 'feekes'].includes(name) || (tokens.includes('stage') && tokens.length <= 2)) return 'stage';
  if (['note', 'notes', 'comment', 'comments', 'remark', 'remarks'].includes(name)) return 'note';
  return null;
}

export function lengthUnitHint(name: string): LengthUnit | null {
  const t = name.split('_');
  if (t.includes('cm') || t.includes('centimetres') || t.includes('centimeters')) return 'cm';
  if (t.includes('in') || t.includes('inch') || t.includes('inches')) return 'in';
  return null;
}

export function biomassUnitHint(name: string): BiomassUnit | null {
  if (/(^|_)kg_ha($|_)/.test(name)) return 'kg_ha';
  if (/(^|_)lbs?_(ac|acre|a)($|_)/.test(name)) return 'lb_ac';
  if (/(^|_)g_m2($|_)/.test(name)) return 'g_m2';
  return null;
}

/** Which column plays which part; an error message when the header does not say. */
export function mapColumns(header: string[]): { ok: true; map: ColumnMap; columns: ColumnInfo[]; hints: ImportCheck['hints'] } | { ok: false; message: string; columns: ColumnInfo[] } {
  const columns: ColumnInfo[] = header.map((h) => ({ header: h, role: roleOf(normaliseHeader(h)) }));
  const found: Partial<Record<Role, number>> = {};
  for (const [i, c] of columns.entries()) {
    if (!c.role) continue;
    if (found[c.role] !== undefined) {
      if (c.role === 'length' || c.role === 'biomass') {
        return { ok: false, columns, message: `Two columns look like the ${c.role} column (“${header[found[c.role]!]}” and “${c.header}”); keep one of them.` };
      }
      c.role = null; // a second note or site column is ignored
      continue;
    }
    found[c.role] = i;
  }
  if (found.length === undefined || found.biomass === undefined) {
    const missing = [found.length === undefined ? 'a length column (e.g. length_cm or length_in)' : null, found.biomass === undefined ? 'a biomass column (e.g. biomass_kg_ha, biomass_lb_ac or biomass_g_m2)' : null]
      .filter(Boolean)
      .join(' and ');
    return { ok: false, columns, message: `The first line must name the columns. It needs ${missing}; it has: ${header.map((h) => `“${h}”`).join(', ') || 'nothing'}.` };
  }
  const map: ColumnMap = { length: found.length, biomass: found.biomass, site: found.site, date: found.date, stage: found.stage, note: found.note };
  return {
    ok: true,
    map,
    columns,
    hints: { lengthUnit: lengthUnitHint(normaliseHeader(header[map.length]!)), biomassUnit: biomassUnitHint(normaliseHeader(header[map.biomass]!)) },
  };
}

const NUMBER = /^[-+]?(\d+\.?\d*|\.\d+)(e[-+]?\d+)?$/i;

/** A number as spreadsheets write it: "61.5"; "61,5" in a semicolon file; "4,500" as thousands in a comma file. */
export function parseNumber(cell: string, delimiter: ',' | ';'): number | null {
  let s = cell.replace(/[\s\u00a0\u202f]/g, '');
  if (delimiter === ';' && /^[-+]?\d+,\d+$/.test(s)) s = s.replace(',', '.');
  else if (/^[-+]?\d{1,3}(,\d{3})+(\.\d+)?$/.test(s)) s = s.replace(/,/g, '');
  if (!NUMBER.test(s)) return null;
  const v = Number(s);
  return Number.isFinite(v) ? v : null;
}

function isIsoDate(s: string): boolean {
  if (!/^\d{4}-\d{2}-\d{2}$/.test(s)) return false;
  const d = new Date(`${s}T00:00:00Z`);
  return !Number.isNaN(d.getTime()) && d.toISOString().slice(0, 10) === s;
}


export interface CheckOptions {
  lengthUnit?: LengthUnit | null;
  biomassUnit?: BiomassUnit | null;
  maxRows?: number;
}

const empty = (fileError: string): ImportCheck => ({
  fileError,
  delimiter: null,
  columns: [],
  hints: { lengthUnit: null, biomassUnit: null },
  lengthUnit: null,
  biomassUnit: null,
  unitErrors: {},
  rowCount: 0,
  points: [],
  errors: [],
  errorCount: 0,
  setErrors: [],
  ok: false,
});

/** Checks a decoded CSV text and converts its points; never throws for bad content. */
export function checkCalibrationCsv(text: string, options: CheckOptions = {}): ImportCheck {
  let table: CsvTable;
  try {
    table = readCsvText(text, { maxRows: options.maxRows ?? MAX_POINTS });
  } catch (e) {
    if (e instanceof CsvReadError) return empty(e.message);
    throw e;
  }
  const mapped = mapColumns(table.header);
  if (!mapped.ok) return { ...empty(mapped.message), delimiter: table.delimiter, columns: mapped.columns, rowCount: table.rows.length };
  const { map, hints } = mapped;
  const lengthUnit = options.lengthUnit ?? hints.lengthUnit;
  const biomassUnit = options.biomassUnit ?? hints.biomassUnit;
  const unitErrors: ImportCheck['unitErrors'] = {};
  if (!lengthUnit) unitErrors.lengthUnit = `Choose the unit of the “${table.header[map.length]}” column: its name does not say.`;
  if (!biomassUnit) unitErrors.biomassUnit = `Choose the unit of the “${table.header[map.biomass]}” column: its name does not say.`;

  const errors: RowError[] = [];
  let errorCount = 0;
  const fail = (line: number, message: string) => {
    errorCount++;
    if (errors.length < MAX_ERRORS_KEPT) errors.push({ line, message });
  };
  const lengthName = table.header[map.length];
  const biomassName = table.header[map.biomass];
  const points: DatasetPoint[] = [];
  const maxLen = lengthUnit === 'in' ? MAX_LENGTH_CM / 2.54 : MAX_LENGTH_CM;
  const maxBio = biomassUnit === 'lb_ac' ? MAX_BIOMASS_KG_HA / lbPerAcToKgPerHa(1) : biomassUnit === 'g_m2' ? MAX_BIOMASS_KG_HA / 10 : MAX_BIOMASS_KG_HA;
  const lenUnit = lengthUnit ? ` ${LENGTH_UNIT_LABELS[lengthUnit]}` : '';
  const bioUnit = biomassUnit ? ` ${BIOMASS_UNIT_LABELS[biomassUnit]}` : '';

  for (const [i, cells] of table.rows.entries()) {
    const line = table.lines[i]!;
    const before = errorCount;
    const extra = cells.slice(table.header.length).filter((c) => c !== '');
    if (extra.length) {
      fail(line, `this row has ${cells.length} cells but the header names ${table.header.length} columns (a decimal comma in a comma-separated file?).`);
      continue;
    }
    const cell = (k: number | undefined) => (k === undefined ? '' : (cells[k] ?? '').trim());
    const rawLength = cell(map.length);
    const rawBiomass = cell(map.biomass);
    const length = parseNumber(rawLength, table.delimiter);
    const biomass = parseNumber(rawBiomass, table.delimiter);
    if (rawLength === '') fail(line, `${lengthName} is empty.`);
    else if (length === null) fail(line, `${lengthName} “${rawLength}” is not a number.`);
    else if (length <= 0) fail(line, `${lengthName} must be greater than 0 (it is ${rawLength}).`);
    else if (lengthUnit && length > maxLen) fail(line, `${lengthName} ${rawLength}${lenUnit} is longer than ${formatUpTo(maxLen, 1)}${lenUnit}: check the value and the unit.`);
    if (rawBiomass === '') fail(line, `${biomassName} is empty.`);
    else if (biomass === null) fail(line, `${biomassName} “${rawBiomass}” is not a number.`);
    else if (biomass < 0) fail(line, `${biomassName} must not be negative (it is ${rawBiomass}).`);
    else if (biomassUnit && biomass > maxBio) fail(line, `${biomassName} ${rawBiomass}${bioUnit} is more than ${formatUpTo(maxBio, 1)}${bioUnit}: check the value and the unit.`);
    const date = cell(map.date);
    if (date && !isIsoDate(date)) fail(line, `date “${date}” is not a date written YYYY-MM-DD.`);
    const site = cell(map.site);
    const stage = cell(map.stage);
    const note = cell(map.note);
    if (site.length > 200) fail(line, 'site is longer than 200 characters.');
    if (stage.length > 40) fail(line, 'stage is longer than 40 characters.');
    if (note.length > 500) fail(line, 'note is longer than 500 characters.');
    if (errorCount > before || length === null || biomass === null || !lengthUnit || !biomassUnit) continue;
    const p: DatasetPoint = { x: toCm(length, lengthUnit), y: toKgHa(biomass, biomassUnit), line };
    if (site) p.site = site;
    if (date) p.date = date;
    if (stage) p.stage = stage;
    if (note) p.note = note;
    points.push(p);
  }

  const setErrors: string[] = [];
  if (table.rows.length < MIN_POINTS) {
    setErrors.push(`The file has ${table.rows.length} data ${table.rows.length === 1 ? 'row' : 'rows'}; at least ${MIN_POINTS} paired points are needed to fit and compare the models.`);
  } else if (errorCount === 0 && lengthUnit && biomassUnit && new Set(points.map((p) => p.x)).size < 3) {
    setErrors.push('The points need at least three different lengths to fit a curve.');
  }
  return {
    fileError: null,
    delimiter: table.delimiter,
    columns: mapped.columns,
    hints,
    lengthUnit,
    biomassUnit,
    unitErrors,
    rowCount: table.rows.length,
    points,
    errors,
    errorCount,
    setErrors,
    ok: errorCount === 0 && setErrors.length === 0 && !unitErrors.lengthUnit && !unitErrors.biomassUnit,
  };
}

export const isLengthUnit = (v: unknown): v is LengthUnit => LENGTH_UNITS.includes(v as LengthUnit);
export const isBiomassUnit = (v: unknown): v is BiomassUnit => BIOMASS_UNITS.includes(v as BiomassUnit);
