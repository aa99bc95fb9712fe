import type { Knex } from 'knex';
import type { ZodType } from 'zod';
import { acToHa, haToAc, kgPerHaToLbPerAc, lbPerAcToKgPerHa } from '../../../shared/calc/units';
import { formatUpTo } from '../../../shared/format/figures';
import { seasonOfDate } from '../../../shared/registry/season';
import { fieldInputSchema, plantingInputSchema } from '../../../shared/schemas/registry';
import { registryKeys } from './db';
import { AREA_UNITS, COLUMN_BY_KEY, COLUMN_KEYS, ColumnKey, IMPORT_COLUMNS, Mapping, RATE_UNITS } from './columns';
import { CsvRecord, ParsedCsv } from './read';
import { CropOption, cropMatcher, nameKey, parseDate, parseNumber, parseSeason, ranchNameSchema } from './values';

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
  const { ranches: ranchRows, fields: fieldRows, plantings: plantingRows } = await registryKeys(db, organisationId);
  const ranchKeyById = new Map<string, string>();
  for (const r of ranchRows) {
    const key = nameKey(r.name);
    ranchKeyById.set(r.id, key);
    if (!snap.ranches.has(key)) snap.ranches.set(key, r);
  }
  for (const f of fieldRows) {
    const key = `${ranchKeyById.get(f.ranch_id)}\u0000${nameKey(f.name)}`;
    if (!snap.fields.has(key)) snap.fields.set(key, { id: f.id, name: f.name, areaHa: Number(f.area_ha) });
  }
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
      // A season that contradicts the seeding date is the shared schema's rule (below), as on the form.
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
        if (seedingRateKgHa > 2000) add('seeding_rate', `${formatUpTo(n)} ${rateUnit} is more than any seeding rate (at most 2,000 kg/ha, ${formatUpTo(kgPerHaToLbPerAc(2000), 0)} lb/ac): check the unit.`);
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
          // Placeholders agree with each other, so the season rule speaks only of the values typed.
          season: seededOn ? (season ?? seasonOfDate(seededOn)) : '2000-01',
          crop: crop ?? 'other',
          variety: raw.variety || null,
          // A date that failed above is replaced by one that cannot put the others out of order.
          seededOn: seededOn ?? '2000-07-01',
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
            message: `Crowntip has ${formatUpTo(stored)} ${areaUnit} for “${existingField.name}”, the file ${raw.area} ${areaUnit}. The registry keeps its area; change it on the field’s page if the file is right.`,
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
