

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
  const areaHint = columns.area === null ? null : areaUnitHint(headers[columns.area]!);
  const rateHint = columns.seeding_rate === null ? null : rateUnitHint(headers[columns.seeding_rate]!);
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
