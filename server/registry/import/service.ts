import { randomBytes } from 'node:crypto';
import fs from 'node:fs/promises';
import path from 'node:path';
import { parse } from 'csv-parse/sync';
import type { Knex } from 'knex';
import type { ZodType } from 'zod';
import { acToHa, haToAc, kgPerHaToLbPerAc, lbPerAcToKgPerHa } from '../../../shared/calc/units';
import { isSeason, seasonOfDate } from '../../../shared/registry/season';
import { fieldInputSchema, plantingInputSchema, ranchInputSchema } from '../../../shared/schemas/registry';
import * as ranchesDb from '../ranches-db';
import * as fieldsDb from '../fields-db';
import * as plantingsDb from '../plantings-db';
import { appendChange } from '../history-db';
import { HttpError } from '../../platform/errors';
import { inOrganisation } from '../../platform/scope';

/**
 * The registry CSV import: read an uploaded file, map its columns to Crowntip's, check every row
 * against the registry, and write all rows in one transaction or none.
 *
 * Layout: (1) columns and header matching, (2) reading the file, (3) values, (4) the row checker
 * (pure: it takes a snapshot of the registry), (5) the commit, (6) uploads kept between preview
 * and commit, (7) the in-process job list for progress, (8) the template and example files.
 */

// 1. Columns ------------------------------------------------------------------------------------

export const COLUMN_KEYS = [
  'ranch',
  'field',
  'area',
  'season',
  'crop',
  'variety',
  'seeded_on',
  'seeding_rate',
  'planned_termination_on',
  'terminated_on',
  'notes',
] as const;
export type ColumnKey = (typeof COLUMN_KEYS)[number];

export interface ImportColumn {
  key: ColumnKey;
  label: string;
  required: boolean;
  format: string;
  /** Header names recognised for this column (compared after normalising: see normaliseHeader). */
  synonyms: string[];
}

export const IMPORT_COLUMNS: readonly ImportColumn[] = [
  { key: 'ranch', label: 'Ranch', required: true, format: 'The ranch’s name. A ranch not yet in Crowntip is created.', synonyms: ['ranch', 'ranch name', 'ranch_name', 'farm', 'farm name'] },
  { key: 'field', label: 'Field', required: true, format: 'The field’s name on that ranch. A field not yet in Crowntip is created.', synonyms: ['field', 'field name', 'field_name', 'block', 'block name', 'field id'] },
  {
    key: 'area',
    label: 'Area',
    required: true,
    format: 'A number in acres or hectares (you choose which). For a field already in Crowntip it should match the registry.',
    synonyms: ['area', 'area_ac', 'area_ha', 'area ac', 'area ha', 'acres', 'acreage', 'ac', 'hectares', 'ha', 'field area', 'size', 'area acres', 'area hectares'],
  },
  { key: 'season', label: 'Season', required: false, format: 'Written 2026-27. When empty or absent it follows from the seeding date (July to June).', synonyms: ['season', 'cover crop season', 'crop season', 'winter'] },
  {
    key: 'crop',
    label: 'Crop',
    required: true,
    format: 'A crop of the list, by name or code: Cereal rye (cereal_rye), Triticale, Barley, Oats, Wheat, Legume, Mix, Other.',
    synonyms: ['crop', 'species', 'cover crop', 'cover crop species', 'crop type'],
  },
  { key: 'variety', label: 'Variety', required: false, format: 'Free text.', synonyms: ['variety', 'cultivar', 'var'] },
  {
    key: 'seeded_on',
    label: 'Seeded on',
    required: true,
    format: 'A date written YYYY-MM-DD, e.g. 2026-10-14.',
    synonyms: ['seeded_on', 'seeded on', 'seeded', 'seeding date', 'planting date', 'planted', 'planted on', 'date planted', 'date seeded', 'sown', 'sown on', 'sowing date', 'seed date'],
  },
  {
    key: 'seeding_rate',
    label: 'Seeding rate',
    required: false,
    format: 'A number in lb/ac or kg/ha (you choose which).',
    synonyms: ['seeding_rate', 'seeding rate', 'seed rate', 'rate', 'seeding_rate_lb_ac', 'seeding_rate_kg_ha', 'lb ac', 'lbs ac', 'kg ha'],
  },
  {
    key: 'planned_termination_on',
    label: 'Planned termination',
    required: false,
    format: 'A date written YYYY-MM-DD.',
    synonyms: ['planned_termination_on', 'planned termination', 'planned termination on', 'planned termination date', 'termination planned', 'planned kill date'],
  },
  {
    key: 'terminated_on',
    label: 'Terminated on',
    required: false,
    format: 'A date written YYYY-MM-DD, not before seeding.',
    synonyms: ['terminated_on', 'terminated on', 'terminated', 'termination date', 'date terminated', 'termination', 'kill date'],
  },
  { key: 'notes', label: 'Notes', required: false, format: 'Free text, kept on the planting.', synonyms: ['notes', 'note', 'comments', 'comment', 'remarks'] },
];

export const COLUMN_BY_KEY = Object.fromEntries(IMPORT_COLUMNS.map((c) => [c.key, c])) as Record<ColumnKey, ImportColumn>;

export type AreaUnit = 'ac' | 'ha';
export type RateUnit = 'lb_ac' | 'kg_ha';
export const AREA_UNITS: Record<AreaUnit, string> = { ac: 'acres', ha: 'hectares' };
export const RATE_UNITS: Record<RateUnit, string> = { lb_ac: 'lb/ac', kg_ha: 'kg/ha' };

export interface Mapping {
  /** Index of the file's column for each of Crowntip's columns, or null when the file has none. */
  columns: Record<ColumnKey, number | null>;
  areaUnit: AreaUnit;
  rateUnit: RateUnit;
}

/** "Area (ac)", "AREA_AC", "área ac" → "area ac". */
export function normaliseHeader(h: string): string {
  return h
    .normalize('NFKD')
    .replace(/[\u0300-\u036f]/g, '')
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, ' ')
    .trim();
}

const UNIT_WORDS = new Set(['ac', 'acre', 'acres', 'ha', 'hectare', 'hectares', 'lb', 'lbs', 'kg', 'per', 'in']);
const withoutUnits = (normalised: string) =>
  normalised
    .split(' ')
    .filter((w) => !UNIT_WORDS.has(w))
    .join(' ');

function areaUnitHint(header: string): AreaUnit | null {
  const words = normaliseHeader(header).split(' ');
  if (words.some((w) => w === 'ac' || w === 'acre' || w === 'acres' || w === 'acreage')) return 'ac';
  if (words.some((w) => w === 'ha' || w === 'hectare' || w === 'hectares')) return 'ha';
  return null;
}

function rateUnitHint(header: string): RateUnit | null {
  const words = normaliseHeader(header).split(' ');
  if (words.some((w) => w === 'lb' || w === 'lbs')) return 'lb_ac';
  if (words.includes('kg')) return 'kg_ha';
  return null;
}

/**
 * Pre-matches the file's headers to Crowntip's columns: exact (normalised) names and synonyms
 * first, then the same with unit words taken out ("Seeding rate (lb/ac)" → "seeding rate").
 * Each file column is used at most once. Units come from a header hint, else the user's setting.
 */
export function autoMapping(headers: readonly string[], units: 'us' | 'metric'): Mapping {
  const columns = Object.fromEntries(COLUMN_KEYS.map((k) => [k, null])) as Record<ColumnKey, number | null>;
  const used = new Set<number>();
  const normalised = headers.map(normaliseHeader);
  const passes: ((h: string) => string)[] = [(h) => h, withoutUnits];
  for (const pass of passes) {
    for (const col of IMPORT_COLUMNS) {
      if (columns[col.key] !== null) continue;
      const names = new Set(col.synonyms.map((s) => pass(normaliseHeader(s))).filter(Boolean));
      const index = normalised.findIndex((h, i) => !used.has(i) && h !== '' && names.has(pass(h)));
      if (index >= 0) {
        columns[col.key] = index;
        used.add(index);
      }
    }
  }
  const areaHint = columns.area === null ? null : areaUnitHint(headers[columns.area]);
  const rateHint = columns.seeding_rate === null ? null : rateUnitHint(headers[columns.seeding_rate]);
  return {
    columns,
    areaUnit: areaHint ?? (units === 'metric' ? 'ha' : 'ac'),
    rateUnit: rateHint ?? (units === 'metric' ? 'kg_ha' : 'lb_ac'),
  };
}

/**
 * The mapping chosen on the preview page (`map_<column>=<index>`, `area_unit`, `rate_unit`), on
 * top of the automatic one: a parameter that is present wins, '' meaning "not in the file".
 */
export function mappingFromParams(params: Record<string, unknown>, headerCount: number, fallback: Mapping): Mapping {
  const columns = { ...fallback.columns };
  for (const key of COLUMN_KEYS) {
    const raw = params[`map_${key}`];
    if (typeof raw !== 'string') continue;
    const n = raw === '' ? null : Number(raw);
    columns[key] = n !== null && Number.isInteger(n) && n >= 0 && n < headerCount ? n : null;
  }
  const areaUnit = params.area_unit === 'ac' || params.area_unit === 'ha' ? params.area_unit : fallback.areaUnit;
  const rateUnit = params.rate_unit === 'lb_ac' || params.rate_unit === 'kg_ha' ? params.rate_unit : fallback.rateUnit;
  return { columns, areaUnit, rateUnit };
}

/** The mapping as form or query parameters (the inverse of mappingFromParams). */
export function mappingToParams(m: Mapping): Record<string, string> {
  const out: Record<string, string> = {};
  for (const key of COLUMN_KEYS) out[`map_${key}`] = m.columns[key] === null ? '' : String(m.columns[key]);
  out.area_unit = m.areaUnit;
  out.rate_unit = m.rateUnit;
  return out;
}

// 2. Reading the file -------------------------------------------------------------------------

export const MAX_UPLOAD_BYTES = 5 * 1024 * 1024;
/** A larger file holds the database for too long in one transaction: split it. */
export const MAX_ROWS = 20_000;

export class ImportFileError extends Error {}

export interface CsvRecord {
  /** Line of the file where the row starts (the header is line 1), as a spreadsheet numbers it. */
  line: number;
  cells: string[];
}

export interface ParsedCsv {
  headers: string[];
  rows: CsvRecord[];
  delimiter: ',' | ';';
  bom: boolean;
}

/** UTF-8 text, with or without a byte order mark; anything else is refused with a hint. */
export function decodeUtf8(buffer: Uint8Array): { text: string; bom: boolean } {
  const bom = buffer.length >= 3 && buffer[0] === 0xef && buffer[1] === 0xbb && buffer[2] === 0xbf;
  if ((buffer[0] === 0xff && buffer[1] === 0xfe) || (buffer[0] === 0xfe && buffer[1] === 0xff)) {
    throw new ImportFileError('The file is UTF-16 (“Unicode text”), not UTF-8. In your spreadsheet choose “Save as” → “CSV UTF-8” and upload that file.');
  }
  try {
    // TextDecoder drops the BOM itself (ignoreBOM false).
    return { text: new TextDecoder('utf-8', { fatal: true }).decode(buffer), bom };
  } catch {
    throw new ImportFileError('The file is not UTF-8 text. In your spreadsheet choose “Save as” → “CSV UTF-8” and upload that file.');
  }
}

/** Comma or semicolon: whichever occurs more often outside quotes on the header line. */
export function detectDelimiter(text: string): ',' | ';' {
  let commas = 0;
  let semicolons = 0;
  let quoted = false;
  for (let i = 0; i < text.length; i++) {
    const ch = text[i];
    if (ch === '"') quoted = !quoted;
    else if (!quoted && (ch === '\n' || ch === '\r')) break;
    else if (!quoted && ch === ',') commas++;
    else if (!quoted && ch === ';') semicolons++;
  }
  return semicolons > commas ? ';' : ',';
}

const countNewlines = (cells: string[]) => {
  let n = 0;
  for (const c of cells) for (let i = c.indexOf('\n'); i >= 0; i = c.indexOf('\n', i + 1)) n++;
  return n;
};

export function parseCsv(buffer: Uint8Array): ParsedCsv {
  const { text, bom } = decodeUtf8(buffer);
  if (!text.trim()) throw new ImportFileError('The file is empty.');
  const delimiter = detectDelimiter(text);
  let records: { record: string[]; info: { lines: number } }[];
  try {
    records = parse(text, { delimiter, info: true, relax_column_count: true, skip_empty_lines: true, bom: true }) as unknown as typeof records;
  } catch (err) {
    const e = err as { code?: string; lines?: number; message?: string };
    const where = e.lines ? ` near line ${e.lines}` : '';
    const why = e.code === 'CSV_QUOTE_NOT_CLOSED' ? 'a quote (") is opened and never closed' : 'it is not well-formed CSV';
    throw new ImportFileError(`The file cannot be read${where}: ${why}.`);
  }
  if (!records.length) throw new ImportFileError('The file is empty.');
  const headers = records[0].record.map((h) => h.trim());
  if (!headers.some(Boolean)) throw new ImportFileError('The first line should name the columns, but it is empty.');
  const rows: CsvRecord[] = [];
  for (let i = 1; i < records.length; i++) {
    const { record, info } = records[i];
    if (record.every((c) => c.trim() === '')) continue;
    rows.push({ line: info.lines - countNewlines(record), cells: record });
  }
  if (!rows.length) throw new ImportFileError('The file has a header line but no rows.');
  if (rows.length > MAX_ROWS) {
    throw new ImportFileError(`The file has ${rows.length.toLocaleString('en-US')} rows; Crowntip imports at most ${MAX_ROWS.toLocaleString('en-US')} at once. Split it into smaller files.`);
  }
  return { headers, rows, delimiter, bom };
}

// 3. Values -----------------------------------------------------------------------------------

/**
 * A plain number. A semicolon-separated file may use a decimal comma ("12,5"); a comma-separated
 * one may group thousands ("1,250.5", quoted in the file). Anything else (units, text) is null.
 */
export function parseNumber(raw: string, delimiter: ',' | ';'): number | null {
  let s = raw.trim();
  if (delimiter === ';' && /^[+-]?\d+,\d+$/.test(s)) s = s.replace(',', '.');
  else if (delimiter === ',' && /^[+-]?\d{1,3}(,\d{3})+(\.\d+)?$/.test(s)) s = s.replace(/,/g, '');
  if (!/^[+-]?(\d+\.?\d*|\.\d+)$/.test(s)) return null;
  return Number(s);
}

const isRealDate = (y: number, m: number, d: number) => {
  const t = new Date(Date.UTC(y, m - 1, d));
  return t.getUTCFullYear() === y && t.getUTCMonth() === m - 1 && t.getUTCDate() === d;
};
const pad2 = (n: number) => String(n).padStart(2, '0');

/** ISO dates only (a time after the date is dropped); other forms get a message that says how to write it. */
export function parseDate(raw: string): { ok: true; value: string } | { ok: false; message: string } {
  const s = raw.trim();
  const iso = /^(\d{4})-(\d{1,2})-(\d{1,2})(?:[T ]\d{1,2}:\d{2}(?::\d{2}(?:\.\d+)?)?Z?)?$/.exec(s);
  if (iso) {
    const [y, m, d] = [Number(iso[1]), Number(iso[2]), Number(iso[3])];
    if (isRealDate(y, m, d)) return { ok: true, value: `${iso[1]}-${pad2(m)}-${pad2(d)}` };
    return { ok: false, message: `“${s}” is not a date in the calendar.` };
  }
  const slash = /^(\d{1,2})[/.](\d{1,2})[/.](\d{4})$/.exec(s);
  if (slash) {
    const [a, b, y] = [Number(slash[1]), Number(slash[2]), slash[3]];
    if (a <= 12 && b > 12 && isRealDate(Number(y), a, b)) {
      return { ok: false, message: `Write dates as YYYY-MM-DD: “${s}” looks like month/day/year, which is ${y}-${pad2(a)}-${pad2(b)}.` };
    }
    if (a > 12 && b <= 12 && isRealDate(Number(y), b, a)) {
      return { ok: false, message: `Write dates as YYYY-MM-DD: “${s}” looks like day/month/year, which is ${y}-${pad2(b)}-${pad2(a)}.` };
    }
    return { ok: false, message: `Write dates as YYYY-MM-DD: “${s}” could be read as month/day or day/month.` };
  }
  return { ok: false, message: `“${s}” is not a date. Write dates as YYYY-MM-DD, e.g. 2026-10-14.` };
}

/** "2026-27", also written "2026–27", "2026/27" or "2026-2027". */
export function parseSeason(raw: string): string | null {
  const s = raw.trim().replace(/[\u2010-\u2015/]/g, '-');
  const long = /^(\d{4})-(\d{4})$/.exec(s);
  const season = long && Number(long[2]) === Number(long[1]) + 1 ? `${long[1]}-${long[2].slice(2)}` : s;
  return isSeason(season) ? season : null;
}

export interface CropOption {
  code: string;
  label: string;
}

const cropKey = (s: string) => s.trim().toLowerCase().replace(/[\s_-]+/g, ' ');
// A few names people write for the listed crops.
const CROP_SYNONYMS: Record<string, string> = { rye: 'cereal_rye', 'winter rye': 'cereal_rye', oat: 'oats', 'winter wheat': 'wheat' };

/** Crop codes and labels, case and spacing aside: "Cereal rye", "CEREAL_RYE", "cereal-rye" → cereal_rye. */
export function cropMatcher(crops: readonly CropOption[]): (raw: string) => string | null {
  const byKey = new Map<string, string>();
  for (const c of crops) {
    byKey.set(cropKey(c.code), c.code);
    byKey.set(cropKey(c.label), c.code);
  }
  for (const [name, code] of Object.entries(CROP_SYNONYMS)) if (crops.some((c) => c.code === code) && !byKey.has(name)) byKey.set(name, code);
  return (raw) => byKey.get(cropKey(raw)) ?? null;
}

const ranchNameSchema = ranchInputSchema.pick({ name: true });
const nameKey = (s: string) => s.trim().replace(/\s+/g, ' ').toLowerCase();
const fmt = (n: number, digits = 2) => n.toLocaleString('en-US', { maximumFractionDigits: digits });

// 4. Checking rows ----------------------------------------------------------------------------

/** What the registry already holds, keyed by lower-cased names, for the checks. */
export interface RegistrySnapshot {
  ranches: Map<string, { id: string; name: string }>;
  /** Key: ranch key + NUL + field key. */
  fields: Map<string, { id: string; name: string; areaHa: number }>;
  /** Key: field id + NUL + season. */
  plantings: Set<string>;
}

export const emptySnapshot = (): RegistrySnapshot => ({ ranches: new Map(), fields: new Map(), plantings: new Set() });

export async function loadSnapshot(db: Knex, organisationId: string): Promise<RegistrySnapshot> {
  const snap = emptySnapshot();
  const ranchRows: { id: string; name: string }[] = await inOrganisation(db, 'ranches', organisationId).select('id', 'name');
  const ranchKeyById = new Map<string, string>();
  for (const r of ranchRows) {
    const key = nameKey(r.name);
    ranchKeyById.set(r.id, key);
    if (!snap.ranches.has(key)) snap.ranches.set(key, r);
  }
  const fieldRows: { id: string; ranch_id: string; name: string; area_ha: number }[] = await inOrganisation(db, 'fields', organisationId).select(
    'id',
    'ranch_id',
    'name',
    'area_ha',
  );
  for (const f of fieldRows) {
    const key = `${ranchKeyById.get(f.ranch_id)}\u0000${nameKey(f.name)}`;
    if (!snap.fields.has(key)) snap.fields.set(key, { id: f.id, name: f.name, areaHa: Number(f.area_ha) });
  }
  const plantingRows: { field_id: string; season: string }[] = await inOrganisation(db, 'plantings', organisationId).select('field_id', 'season');
  for (const p of plantingRows) snap.plantings.add(`${p.field_id}\u0000${p.season}`);
  return snap;
}

export interface Problem {
  /** File line of the row (the header is line 1); 0 for a problem of the whole file or mapping. */
  line: number;
  column: ColumnKey | null;
  value: string;
  message: string;
}

export interface CheckedRow {
  line: number;
  raw: Record<ColumnKey, string>;
  ranch: string;
  field: string;
  ranchKey: string;
  fieldKey: string;
  areaHa: number | null;
  season: string | null;
  seasonFromDate: boolean;
  crop: string | null;
  variety: string | null;
  seededOn: string | null;
  seedingRateKgHa: number | null;
  plannedTerminationOn: string | null;
  terminatedOn: string | null;
  notes: string | null;
  newRanch: boolean;
  newField: boolean;
  problemCount: number;
}

export interface PlanRanch {
  key: string;
  name: string;
  line: number;
}
export interface PlanField {
  key: string;
  ranchKey: string;
  name: string;
  areaHa: number | null;
  line: number;
  areaRaw: string;
}

export interface CheckResult {
  rows: CheckedRow[];
  /** Problems of the mapping (line 0): a required column not chosen, a column chosen twice. */
  fileProblems: Problem[];
  /** Every row problem, in file order. Any problem blocks the import. */
  problems: Problem[];
  /** Worth a look, but not blocking (an existing field whose area differs). */
  warnings: Problem[];
  newRanches: PlanRanch[];
  newFields: PlanField[];
  plantingsOnExistingFields: number;
  seasons: string[];
}

export const canImport = (r: CheckResult) => r.fileProblems.length === 0 && r.problems.length === 0 && r.rows.length > 0;

// zod paths of the shared input schemas → the CSV column they came from.
const PATH_TO_COLUMN: Record<string, ColumnKey> = {
  areaHa: 'area',
  season: 'season',
  crop: 'crop',
  variety: 'variety',
  seededOn: 'seeded_on',
  seedingRateKgHa: 'seeding_rate',
  plannedTerminationOn: 'planned_termination_on',
  terminatedOn: 'terminated_on',
  notes: 'notes',
};

function zodIssues(schema: ZodType, input: unknown, columnOf: (path: string) => ColumnKey | undefined): { column: ColumnKey; message: string }[] {
  const result = schema.safeParse(input);
  if (result.success) return [];
  const out: { column: ColumnKey; message: string }[] = [];
  for (const issue of result.error.issues) {
    const column = columnOf(String(issue.path[0] ?? ''));
    if (column) out.push({ column, message: issue.message });
  }
  return out;
}

export interface CheckOptions {
  mapping: Mapping;
  delimiter: ',' | ';';
  snapshot: RegistrySnapshot;
  crops: readonly CropOption[];
}

/**
 * Checks rows one at a time (so that a caller can yield between chunks and report progress) and
 * plans what the import creates. Pure: everything it knows of the database is the snapshot.
 */
export function createChecker(opts: CheckOptions) {
  const { mapping, delimiter, snapshot } = opts;
  const matchCrop = cropMatcher(opts.crops);
  const cropNames = opts.crops.map((c) => c.label).join(', ');
  const areaUnit = mapping.areaUnit === 'ac' ? 'ac' : 'ha';
  const rateUnit = RATE_UNITS[mapping.rateUnit];
  const mapped = (k: ColumnKey) => mapping.columns[k] !== null;

  const fileProblems: Problem[] = [];
  for (const col of IMPORT_COLUMNS) {
    if (col.required && !mapped(col.key)) fileProblems.push({ line: 0, column: col.key, value: '', message: `Choose the file’s column for ${col.label}: it is required.` });
  }
  const chosen = new Map<number, ColumnKey>();
  for (const key of COLUMN_KEYS) {
    const i = mapping.columns[key];
    if (i === null) continue;
    const other = chosen.get(i);
    if (other) {
      fileProblems.push({ line: 0, column: key, value: '', message: `The same file column is chosen for ${COLUMN_BY_KEY[other].label} and ${COLUMN_BY_KEY[key].label}.` });
    } else chosen.set(i, key);
  }

  const rows: CheckedRow[] = [];
  const problems: Problem[] = [];
  const warnings: Problem[] = [];
  const newRanches = new Map<string, PlanRanch>();
  const newFields = new Map<string, PlanField>();
  const plantingLines = new Map<string, number>();
  const seasons = new Set<string>();
  let plantingsOnExistingFields = 0;

  function check(rec: CsvRecord): void {
    const raw = {} as Record<ColumnKey, string>;
    for (const key of COLUMN_KEYS) {
      const i = mapping.columns[key];
      raw[key] = i === null ? '' : (rec.cells[i] ?? '').trim();
    }
    const own: Problem[] = [];
    const flagged = new Set<ColumnKey>();
    const add = (column: ColumnKey, message: string) => {
      own.push({ line: rec.line, column, value: raw[column], message });
      flagged.add(column);
    };

    if (mapped('ranch') && !raw.ranch) add('ranch', 'The ranch is missing.');
    if (mapped('field') && !raw.field) add('field', 'The field name is missing.');

    let areaHa: number | null = null;
    if (mapped('area')) {
      if (!raw.area) add('area', 'The area is missing.');
      else {
        const n = parseNumber(raw.area, delimiter);
        if (n === null) add('area', `“${raw.area}” is not a number. Write only the number: the unit (${AREA_UNITS[mapping.areaUnit]}) is chosen for the whole column.`);
        else if (n <= 0) add('area', 'The area must be more than zero.');
        else areaHa = mapping.areaUnit === 'ac' ? acToHa(n) : n;
      }
    }

    let seededOn: string | null = null;
    if (mapped('seeded_on')) {
      if (!raw.seeded_on) add('seeded_on', 'The seeding date is missing.');
      else {
        const d = parseDate(raw.seeded_on);
        if (d.ok) seededOn = d.value;
        else add('seeded_on', d.message);
      }
    }

    let season: string | null = null;
    let seasonFromDate = false;
    if (raw.season) {
      season = parseSeason(raw.season);
      if (!season) add('season', `“${raw.season}” is not a season. Write it as 2026-27.`);
      else if (seededOn && seasonOfDate(seededOn) !== season) {
        add('season', `Seeded on ${seededOn} belongs to season ${seasonOfDate(seededOn)}, not ${season} (seasons run July to June).`);
      }
    } else if (seededOn) {
      season = seasonOfDate(seededOn);
      seasonFromDate = true;
    }

    let crop: string | null = null;
    if (mapped('crop')) {
      if (!raw.crop) add('crop', 'The crop is missing.');
      else {
        crop = matchCrop(raw.crop);
        if (!crop) add('crop', `Unknown crop “${raw.crop}”. Use one of: ${cropNames}.`);
      }
    }

    let seedingRateKgHa: number | null = null;
    if (raw.seeding_rate) {
      const n = parseNumber(raw.seeding_rate, delimiter);
      if (n === null) add('seeding_rate', `“${raw.seeding_rate}” is not a number. Write only the number: the unit (${rateUnit}) is chosen for the whole column.`);
      else if (n <= 0) add('seeding_rate', 'The seeding rate must be more than zero.');
      else {
        seedingRateKgHa = mapping.rateUnit === 'lb_ac' ? lbPerAcToKgPerHa(n) : n;
        if (seedingRateKgHa > 2000) add('seeding_rate', `${fmt(n)} ${rateUnit} is more than any seeding rate (at most 2,000 kg/ha, ${fmt(kgPerHaToLbPerAc(2000), 0)} lb/ac): check the unit.`);
      }
    }

    const optionalDate = (key: 'planned_termination_on' | 'terminated_on') => {
      if (!raw[key]) return null;
      const d = parseDate(raw[key]);
      if (d.ok) return d.value;
      add(key, d.message);
      return null;
    };
    const plannedTerminationOn = optionalDate('planned_termination_on');
    const terminatedOn = optionalDate('terminated_on');

    // The same rules as the registry's own forms, from the shared schemas; one message per column.
    const shared: { column: ColumnKey; message: string }[] = [];
    if (raw.ranch) shared.push(...zodIssues(ranchNameSchema, { name: raw.ranch }, () => 'ranch'));
    if (raw.field) {
      shared.push(
        ...zodIssues(fieldInputSchema, { ranchId: 'import', name: raw.field, areaHa: areaHa ?? 1 }, (p) => (p === 'name' ? 'field' : PATH_TO_COLUMN[p])),
      );
    }
    shared.push(
      ...zodIssues(
        plantingInputSchema,
        {
          fieldId: 'import',
          season: season ?? '2000-01',
          crop: crop ?? 'other',
          variety: raw.variety || null,
          // A date that failed above is replaced by one that cannot put the others out of order.
          seededOn: seededOn ?? '0001-01-01',
          seedingRateKgHa: seedingRateKgHa !== null && seedingRateKgHa <= 2000 ? seedingRateKgHa : null,
          plannedTerminationOn,
          terminatedOn,
          notes: raw.notes || null,
        },
        (p) => PATH_TO_COLUMN[p],
      ),
    );
    for (const s of shared) if (!flagged.has(s.column)) add(s.column, s.message);

    // The plan: which ranch and field this row lands on, and whether it repeats or already exists.
    const ranchKey = raw.ranch ? nameKey(raw.ranch) : '';
    const fieldKey = raw.ranch && raw.field ? `${ranchKey}\u0000${nameKey(raw.field)}` : '';
    const existingRanch = ranchKey ? snapshot.ranches.get(ranchKey) : undefined;
    const existingField = fieldKey && existingRanch ? snapshot.fields.get(fieldKey) : undefined;
    if (ranchKey && !existingRanch && !newRanches.has(ranchKey)) newRanches.set(ranchKey, { key: ranchKey, name: raw.ranch, line: rec.line });
    if (fieldKey && existingField) {
      if (areaHa !== null && !flagged.has('area')) {
        const diff = Math.abs(areaHa - existingField.areaHa);
        if (diff > 0.02 && diff / existingField.areaHa > 0.01) {
          const stored = mapping.areaUnit === 'ac' ? haToAc(existingField.areaHa) : existingField.areaHa;
          warnings.push({
            line: rec.line,
            column: 'area',
            value: raw.area,
            message: `Crowntip has ${fmt(stored)} ${areaUnit} for “${existingField.name}”, the file ${raw.area} ${areaUnit}. The registry keeps its area; change it on the field’s page if the file is right.`,
          });
        }
      }
    } else if (fieldKey) {
      const first = newFields.get(fieldKey);
      if (!first) newFields.set(fieldKey, { key: fieldKey, ranchKey, name: raw.field, areaHa, line: rec.line, areaRaw: raw.area });
      else if (areaHa !== null && first.areaHa !== null && Math.abs(areaHa - first.areaHa) > 1e-9 && !flagged.has('area')) {
        add('area', `“${raw.field}” has ${raw.area} ${areaUnit} here but ${first.areaRaw} ${areaUnit} in row ${first.line}. A field has one area: make them the same.`);
      }
    }
    if (fieldKey && season) {
      const plantingKey = `${fieldKey}\u0000${season}`;
      const earlier = plantingLines.get(plantingKey);
      if (earlier !== undefined) {
        add('field', `Duplicate: “${raw.field}” on ${raw.ranch} already has a ${season} planting in row ${earlier} of this file.`);
      } else {
        plantingLines.set(plantingKey, rec.line);
        if (existingField && snapshot.plantings.has(`${existingField.id}\u0000${season}`)) {
          add('field', `“${existingField.name}” on ${existingRanch!.name} already has a ${season} planting in Crowntip.`);
        }
      }
    }
    if (existingField) plantingsOnExistingFields++;
    if (season) seasons.add(season);

    own.sort((a, b) => COLUMN_KEYS.indexOf(a.column!) - COLUMN_KEYS.indexOf(b.column!));
    problems.push(...own);
    rows.push({
      line: rec.line,
      raw,
      ranch: raw.ranch,
      field: raw.field,
      ranchKey,
      fieldKey,
      areaHa,
      season,
      seasonFromDate,
      crop,
      variety: raw.variety || null,
      seededOn,
      seedingRateKgHa,
      plannedTerminationOn,
      terminatedOn,
      notes: raw.notes || null,
      newRanch: Boolean(ranchKey) && !existingRanch,
      newField: Boolean(fieldKey) && !existingField,
      problemCount: own.length,
    });
  }

  function finish(): CheckResult {
    return {
      rows,
      fileProblems,
      problems,
      warnings,
      newRanches: [...newRanches.values()],
      newFields: [...newFields.values()],
      plantingsOnExistingFields,
      seasons: [...seasons].sort(),
    };
  }

  return { check, finish };
}

/** All rows at once. */
export function checkRows(parsed: ParsedCsv, opts: Omit<CheckOptions, 'delimiter'>): CheckResult {
  const checker = createChecker({ ...opts, delimiter: parsed.delimiter });
  for (const rec of parsed.rows) checker.check(rec);
  return checker.finish();
}

// 5. The commit -------------------------------------------------------------------------------

export interface ImportActor {
  id: string;
  name: string;
  organisationId: string;
}

export interface ImportProgress {
  phase: 'checking' | 'writing';
  done: number;
  total: number;
}

export interface ImportResult {
  rows: number;
  ranchesCreated: string[];
  fieldsCreated: number;
  plantingsCreated: number;
  seasons: string[];
  ms: number;
  at: string;
}

export type CommitOutcome = { ok: true; result: ImportResult } | { ok: false; check: CheckResult };

const yieldToEventLoop = () => new Promise<void>((resolve) => setImmediate(resolve));

/**
 * Imports every row in one transaction, or nothing when any row has a problem. The rows are first
 * checked outside the transaction in chunks (so that progress can be asked for in between), then
 * checked again inside it against a fresh snapshot, so that a record added meanwhile cannot slip
 * through. Each created ranch, field and planting gets one history entry with action "import".
 */
export async function commitImport(
  db: Knex,
  actor: ImportActor,
  input: { fileName: string; parsed: ParsedCsv; mapping: Mapping; crops: readonly CropOption[] },
  onProgress: (p: ImportProgress) => void = () => {},
): Promise<CommitOutcome> {
  const started = performance.now();
  const { parsed, mapping, crops } = input;
  const total = parsed.rows.length;
  const org = actor.organisationId;

  onProgress({ phase: 'checking', done: 0, total });
  const checker = createChecker({ mapping, delimiter: parsed.delimiter, snapshot: await loadSnapshot(db, org), crops });
  for (let i = 0; i < total; i++) {
    checker.check(parsed.rows[i]);
    if ((i + 1) % 500 === 0) {
      onProgress({ phase: 'checking', done: i + 1, total });
      await yieldToEventLoop();
    }
  }
  const first = checker.finish();
  if (!canImport(first)) return { ok: false, check: first };
  onProgress({ phase: 'writing', done: 0, total });

  const file = input.fileName.length > 80 ? `${input.fileName.slice(0, 77)}…` : input.fileName;
  const user = { id: actor.id, name: actor.name };
  return db.transaction(async (trx): Promise<CommitOutcome> => {
    const snapshot = await loadSnapshot(trx, org);
    const check = checkRows(parsed, { mapping, snapshot, crops });
    if (!canImport(check)) return { ok: false, check };

    const ranchIds = new Map<string, string>();
    const ranchNames = new Map<string, string>();
    for (const [key, r] of snapshot.ranches) {
      ranchIds.set(key, r.id);
      ranchNames.set(key, r.name);
    }
    for (const r of check.newRanches) {
      const name = r.name.trim();
      const id = await ranchesDb.insertRanch(trx, org, { name });
      ranchIds.set(r.key, id);
      ranchNames.set(r.key, name);
      await appendChange(trx, org, {
        entityType: 'ranch',
        entityId: id,
        action: 'import',
        user,
        before: null,
        after: { name, code: null, county: null, notes: null, contactEmails: [] },
        summary: `Ranch “${name}” created by the import of “${file}” (row ${r.line})`,
      });
    }

    const fieldIds = new Map<string, string>();
    const fieldNames = new Map<string, string>();
    for (const [key, f] of snapshot.fields) {
      fieldIds.set(key, f.id);
      fieldNames.set(key, f.name);
    }
    for (const f of check.newFields) {
      const name = f.name.trim();
      const ranchId = ranchIds.get(f.ranchKey)!;
      const id = await fieldsDb.insertField(trx, org, { ranchId, name, areaHa: f.areaHa!, boundary: null, boundaryAreaHa: null, notes: null });
      fieldIds.set(f.key, id);
      fieldNames.set(f.key, name);
      await appendChange(trx, org, {
        entityType: 'field',
        entityId: id,
        action: 'import',
        user,
        before: null,
        after: { ranchId, name, areaHa: f.areaHa, boundary: null, notes: null },
        summary: `Field “${name}” created on ${ranchNames.get(f.ranchKey)} by the import of “${file}” (row ${f.line})`,
      });
    }

    let done = 0;
    for (const row of check.rows) {
      const fieldId = fieldIds.get(row.fieldKey)!;
      const planting = {
        fieldId,
        season: row.season!,
        crop: row.crop!,
        variety: row.variety,
        seededOn: row.seededOn!,
        seedingRateKgHa: row.seedingRateKgHa,
        plannedTerminationOn: row.plannedTerminationOn,
        terminatedOn: row.terminatedOn,
        notes: row.notes,
      };
      const id = await plantingsDb.insertPlanting(trx, org, planting);
      await appendChange(trx, org, {
        entityType: 'planting',
        entityId: id,
        action: 'import',
        user,
        before: null,
        after: planting,
        summary: `Planting ${row.season} (${row.crop}) on ${fieldNames.get(row.fieldKey)}, ${ranchNames.get(row.ranchKey)}, imported from “${file}” (row ${row.line})`,
      });
      if (++done % 500 === 0) onProgress({ phase: 'writing', done, total });
    }
    onProgress({ phase: 'writing', done: total, total });
    return {
      ok: true,
      result: {
        rows: total,
        ranchesCreated: check.newRanches.map((r) => r.name.trim()),
        fieldsCreated: check.newFields.length,
        plantingsCreated: check.rows.length,
        seasons: check.seasons,
        ms: Math.round(performance.now() - started),
        at: new Date().toISOString(),
      },
    };
  });
}

// 6. Uploads kept between preview and commit ------------------------------------------------

export interface ImportMeta {
  id: string;
  organisationId: string;
  userId: string;
  userName: string;
  fileName: string;
  bytes: number;
  uploadedAt: string;
  /** "imported" is final: a second commit of the same upload answers with this result. */
  status: 'uploaded' | 'importing' | 'imported';
  mapping?: Mapping;
  result?: ImportResult;
}

const ID_PATTERN = /^[a-f0-9]{32}$/;
export const isImportId = (id: string) => ID_PATTERN.test(id);

/**
 * Uploaded files under UPLOADS_DIR/imports: `<id>.csv` and a `<id>.json` sidecar naming the
 * organisation, the uploader and the status. The id is 128 random bits; every read checks the
 * organisation, so another organisation's id answers as if it did not exist.
 */
export class ImportStore {
  readonly dir: string;
  constructor(uploadsDir: string) {
    this.dir = path.resolve(uploadsDir, 'imports');
  }

  private file(id: string, ext: 'csv' | 'json') {
    if (!isImportId(id)) throw new Error('bad import id');
    return path.join(this.dir, `${id}.${ext}`);
  }

  async save(buffer: Buffer, meta: Omit<ImportMeta, 'id' | 'status' | 'uploadedAt' | 'bytes'>): Promise<ImportMeta> {
    await fs.mkdir(this.dir, { recursive: true });
    const full: ImportMeta = { ...meta, id: randomBytes(16).toString('hex'), status: 'uploaded', uploadedAt: new Date().toISOString(), bytes: buffer.length };
    await fs.writeFile(this.file(full.id, 'csv'), buffer, { mode: 0o600 });
    await this.update(full);
    return full;
  }

  async get(organisationId: string, id: string): Promise<ImportMeta | undefined> {
    if (!isImportId(id)) return undefined;
    try {
      const meta = JSON.parse(await fs.readFile(this.file(id, 'json'), 'utf8')) as ImportMeta;
      return meta.organisationId === organisationId ? meta : undefined;
    } catch {
      return undefined;
    }
  }

  async read(meta: ImportMeta): Promise<Buffer> {
    return fs.readFile(this.file(meta.id, 'csv'));
  }

  /** Written to a temporary file and renamed, so a reader never sees half a sidecar. */
  async update(meta: ImportMeta): Promise<void> {
    const target = this.file(meta.id, 'json');
    const tmp = `${target}.${process.pid}.tmp`;
    await fs.writeFile(tmp, JSON.stringify(meta), { mode: 0o600 });
    await fs.rename(tmp, target);
  }

  /** Removes uploads older than `days` (run now and then; an old id then answers 404). */
  async sweep(days = 30): Promise<void> {
    const cutoff = Date.now() - days * 86_400_000;
    let names: string[];
    try {
      names = await fs.readdir(this.dir);
    } catch {
      return;
    }
    await Promise.all(
      names.map(async (name) => {
        const full = path.join(this.dir, name);
        const stat = await fs.stat(full).catch(() => null);
        if (stat && stat.mtimeMs < cutoff) await fs.rm(full, { force: true });
      }),
    );
  }
}

// 7. Jobs: the commit runs in the background and the page polls its progress -------------------

export type JobPhase = 'checking' | 'writing' | 'imported' | 'failed' | 'error';

export interface ImportJob {
  id: string;
  organisationId: string;
  phase: JobPhase;
  done: number;
  total: number;
  result?: ImportResult;
  /** On "failed": the check that found problems (nothing was written). */
  check?: CheckResult;
  mapping: Mapping;
  message?: string;
  /** What went wrong, for the log. */
  error?: unknown;
  finishedAt?: number;
  promise: Promise<void>;
}

/** Progress as one number: checking is the first half, writing the second. */
export function jobPercent(job: Pick<ImportJob, 'phase' | 'done' | 'total'>): number {
  if (job.phase === 'imported') return 100;
  const part = job.total ? job.done / job.total : 0;
  if (job.phase === 'checking') return Math.floor(50 * part);
  if (job.phase === 'writing') return 50 + Math.floor(49 * part);
  return 0;
}

/**
 * In-process jobs, one per upload at a time. The transaction is all-or-nothing whatever happens to
 * this list; the list only serves progress. Finished jobs are forgotten after ten minutes (the
 * sidecar keeps an import's final status).
 */
export class ImportJobs {
  private jobs = new Map<string, ImportJob>();

  get(organisationId: string, id: string): ImportJob | undefined {
    this.forgetOld();
    const job = this.jobs.get(id);
    return job && job.organisationId === organisationId ? job : undefined;
  }

  isRunning(id: string): boolean {
    const job = this.jobs.get(id);
    return Boolean(job && (job.phase === 'checking' || job.phase === 'writing'));
  }

  /** Registers the job before its first await, so two quick commits of one upload start it once. */
  start(id: string, organisationId: string, mapping: Mapping, total: number, run: (job: ImportJob) => Promise<void>): ImportJob {
    const job = { id, organisationId, phase: 'checking', done: 0, total, mapping } as ImportJob;
    this.jobs.set(id, job);
    job.promise = run(job).catch((err: unknown) => {
      job.error = err;
      if (job.phase === 'imported') return; // written and committed; only the sidecar failed
      job.phase = 'error';
      job.message = err instanceof Error ? err.message : String(err);
      job.finishedAt = Date.now();
    });
    return job;
  }

  private forgetOld() {
    const cutoff = Date.now() - 10 * 60_000;
    for (const [id, job] of this.jobs) if (job.finishedAt && job.finishedAt < cutoff) this.jobs.delete(id);
  }
}

// 8. Template and example -----------------------------------------------------------------------

/** Header names of the template: Crowntip's columns, with the unit in the two that have one. */
export function templateHeader(units: 'us' | 'metric'): string[] {
  return COLUMN_KEYS.map((k) => {
    if (k === 'area') return units === 'metric' ? 'area_ha' : 'area_ac';
    if (k === 'seeding_rate') return units === 'metric' ? 'seeding_rate_kg_ha' : 'seeding_rate_lb_ac';
    return k;
  });
}

export function templateRows(units: 'us' | 'metric'): string[][] {
  return units === 'metric'
    ? [['Sandpiper Bench', 'North 40 Flats', '16.2', '2026-27', 'Cereal rye', 'Greyleaf', '2026-10-14', '100', '2027-03-10', '', '']]
    : [['Sandpiper Bench', 'North 40 Flats', '40', '2026-27', 'Cereal rye', 'Greyleaf', '2026-10-14', '90', '2027-03-10', '', '']];
}

/** The invented demo scenario's plantings for the coming winter (US units): names and places are made up. */
export const EXAMPLE_HEADER = templateHeader('us');
export const EXAMPLE_ROWS: string[][] = [
  ['Sandpiper Bench', 'North 40 Flats', '40', '2026-27', 'Cereal rye', 'Greyleaf', '2026-10-14', '90', '2027-03-10', '', 'Drilled after the fall lettuce'],
  ['Sandpiper Bench', 'Pump House 3', '22.5', '2026-27', 'Triticale', 'Tallstem 4', '2026-10-15', '110', '2027-03-12', '', ''],
  ['Sandpiper Bench', 'Levee Strip', '8.75', '2026-27', 'Barley', 'Frostline', '2026-10-15', '100', '2027-02-26', '', 'Narrow; walk lengthwise'],
  ['Sandpiper Bench', 'Cottonwood East', '31', '2026-27', 'Oats', 'Quickhusk', '2026-10-20', '100', '2027-03-05', '', ''],
  ['Sandpiper Bench', 'Cottonwood West', '29.4', '2026-27', 'Cereal rye', 'Greyleaf 2', '2026-10-21', '90', '2027-03-05', '', ''],
  ['Sandpiper Bench', 'Old Orchard Block', '12', '2026-27', 'Mix', '', '2026-10-22', '80', '2027-03-20', '', 'Rye and vetch, 70:30 by weight'],
  ['Sandpiper Bench', 'South Terrace', '18.2', '2026-27', 'Wheat', 'Ambergrain', '2026-10-28', '120', '2027-03-15', '', ''],
  ['Kestrel Mesa', 'Mesa Top 1', '55', '2026-27', 'Cereal rye', 'Greyleaf', '2026-10-30', '90', '2027-03-18', '', ''],
  ['Kestrel Mesa', 'Mesa Top 2', '48.6', '2026-27', 'Cereal rye', 'Greyleaf', '2026-10-30', '90', '2027-03-18', '', ''],
  ['Kestrel Mesa', 'Windbreak Field', '14.3', '2026-27', 'Triticale', 'Tallstem 4', '2026-11-02', '110', '2027-03-20', '', ''],
  ['Kestrel Mesa', 'Sump Corner', '6.5', '2026-27', 'Barley', 'Frostline', '2026-11-03', '100', '2027-02-28', '', 'Wet in January most years'],
  ['Kestrel Mesa', 'Long Furrow', '37.25', '2026-27', 'Oats', 'Quickhusk', '2026-11-04', '100', '2027-03-10', '', ''],
  ['Kestrel Mesa', 'Gate 7', '20', '2026-27', 'Legume', 'Hoopvine vetch', '2026-11-05', '40', '2027-04-01', '', 'Not a cereal: shown for the record'],
  ['Willowdrift Ranch', 'Heron Slough', '26.8', '2026-27', 'Cereal rye', 'Greyleaf 2', '2026-11-06', '90', '2027-03-08', '', ''],
  ['Willowdrift Ranch', 'Willow Row', '17.5', '2026-27', 'Triticale', 'Tallstem 4', '2026-11-09', '110', '2027-03-12', '', ''],
  ['Willowdrift Ranch', 'Clay Bottom', '42', '2026-27', 'Barley', 'Frostline', '2026-11-10', '100', '2027-03-01', '', ''],
  ['Willowdrift Ranch', 'Packing Shed North', '9.6', '2026-27', 'Wheat', 'Ambergrain', '2026-11-12', '120', '2027-03-15', '', ''],
  ['Willowdrift Ranch', 'Packing Shed South', '11.1', '2026-27', 'Cereal rye', 'Greyleaf', '2026-11-12', '90', '2027-03-15', '', ''],
  ['Willowdrift Ranch', 'Creek Bend', '33.3', '2026-27', 'Oats', 'Quickhusk', '2026-11-16', '100', '2027-03-22', '', ''],
  ['Willowdrift Ranch', 'Far Pivot', '60', '2026-27', 'Cereal rye', 'Greyleaf 2', '2026-11-18', '90', '2027-03-25', '', 'Sampler: start at the pivot road'],
];

// 9. The import as the routes use it ---------------------------------------------------------

export interface ImportPreview {
  meta: ImportMeta;
  parsed: ParsedCsv;
  mapping: Mapping;
  check: CheckResult;
  crops: CropOption[];
}

export type CommitStart = { kind: 'imported'; meta: ImportMeta } | { kind: 'job'; job: ImportJob };

export function createRegistryImports(db: Knex, uploadsDir: string) {
  const store = new ImportStore(uploadsDir);
  const jobs = new ImportJobs();
  let lastSweep = 0;

  async function load(organisationId: string, id: string): Promise<ImportMeta> {
    const meta = await store.get(organisationId, id);
    if (!meta) throw new HttpError('not_found', 'This import was not found. Upload the file again.');
    return meta;
  }

  async function readParsed(meta: ImportMeta): Promise<ParsedCsv> {
    return parseCsv(await store.read(meta));
  }

  return {
    store,
    jobs,
    load,

    /** Reads the file once (so that an unreadable one is refused at once) and keeps it. */
    async upload(actor: ImportActor, fileName: string, buffer: Buffer): Promise<{ meta: ImportMeta; parsed: ParsedCsv }> {
      const parsed = parseCsv(buffer);
      if (Date.now() - lastSweep > 86_400_000) {
        lastSweep = Date.now();
        await store.sweep();
      }
      const meta = await store.save(buffer, { organisationId: actor.organisationId, userId: actor.id, userName: actor.name, fileName: path.basename(fileName || 'upload.csv') });
      return { meta, parsed };
    },

    async preview(meta: ImportMeta, params: Record<string, unknown>, units: 'us' | 'metric'): Promise<ImportPreview> {
      const parsed = await readParsed(meta);
      const mapping = mappingFromParams(params, parsed.headers.length, autoMapping(parsed.headers, units));
      const crops = await plantingsDb.listCrops(db);
      const check = checkRows(parsed, { mapping, snapshot: await loadSnapshot(db, meta.organisationId), crops });
      return { meta, parsed, mapping, check, crops };
    },

    /**
     * Starts the commit, or answers with what is already there: an import that is done stays done
     * (the sidecar says so), and a running one is not started twice.
     */
    async commit(meta: ImportMeta, params: Record<string, unknown>, actor: ImportActor, units: 'us' | 'metric'): Promise<CommitStart> {
      if (meta.status === 'imported') return { kind: 'imported', meta };
      const running = jobs.get(meta.organisationId, meta.id);
      if (running && (jobs.isRunning(meta.id) || running.phase === 'imported')) return { kind: 'job', job: running };
      const parsed = await readParsed(meta);
      // Checked again after the await: another request may have started it meanwhile.
      const again = jobs.get(meta.organisationId, meta.id);
      if (again && (jobs.isRunning(meta.id) || again.phase === 'imported')) return { kind: 'job', job: again };
      const mapping = mappingFromParams(params, parsed.headers.length, autoMapping(parsed.headers, units));
      const job = jobs.start(meta.id, meta.organisationId, mapping, parsed.rows.length, async (j) => {
        await store.update({ ...meta, status: 'importing', mapping });
        const crops = await plantingsDb.listCrops(db);
        const outcome = await commitImport(db, actor, { fileName: meta.fileName, parsed, mapping, crops }, (p) => {
          j.phase = p.phase;
          j.done = p.done;
          j.total = p.total;
        });
        j.finishedAt = Date.now();
        if (outcome.ok) {
          j.result = outcome.result;
          j.phase = 'imported';
          // Should this write fail, a second commit still cannot duplicate anything: every row
          // would then find its planting already in the registry and the import would stop.
          await store.update({ ...meta, status: 'imported', mapping, result: outcome.result });
        } else {
          j.check = outcome.check;
          j.phase = 'failed';
          await store.update({ ...meta, status: 'uploaded', mapping });
        }
      });
      return { kind: 'job', job };
    },
  };
}

export type RegistryImports = ReturnType<typeof createRegistryImports>;
