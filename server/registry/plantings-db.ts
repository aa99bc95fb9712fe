import { randomUUID } from 'node:crypto';
import type { Knex } from 'knex';
import { inOrganisation, nowIso } from '../platform/scope';

export interface Planting {
  id: string;
  fieldId: string;
  fieldName: string;
  fieldAreaHa: number;
  ranchId: string;
  ranchName: string;
  season: string;
  crop: string;
  variety: string | null;
  seededOn: string;
  seedingRateKgHa: number | null;
  plannedTerminationOn: string | null;
  terminatedOn: string | null;
  notes: string | null;
  createdAt: string;
  updatedAt: string;
}

export interface PlantingWrite {
  fieldId: string;
  season: string;
  crop: string;
  variety?: string | null;
  seededOn: string;
  seedingRateKgHa?: number | null;
  plannedTerminationOn?: string | null;
  terminatedOn?: string | null;
  notes?: string | null;
}

type PlantingRow = Record<string, unknown>;

const toPlanting = (r: PlantingRow): Planting => ({
  id: r.id as string,
  fieldId: r.field_id as string,
  fieldName: r.field_name as string,
  fieldAreaHa: Number(r.field_area_ha),
  ranchId: r.ranch_id as string,
  ranchName: r.ranch_name as string,
  season: r.season as string,
  crop: r.crop as string,
  variety: (r.variety as string) ?? null,
  seededOn: r.seeded_on as string,
  seedingRateKgHa: r.seeding_rate_kg_ha == null ? null : Number(r.seeding_rate_kg_ha),
  plannedTerminationOn: (r.planned_termination_on as string) ?? null,
  terminatedOn: (r.terminated_on as string) ?? null,
  notes: (r.notes as string) ?? null,
  createdAt: r.created_at as string,
  updatedAt: r.updated_at as string,
});

const base = (db: Knex, organisationId: string) =>
  inOrganisation(db, 'plantings', organisationId)
    .join('fields', 'fields.id', 'plantings.field_id')
    .join('ranches', 'ranches.id', 'fields.ranch_id')
    .select('plantings.*', 'fields.name as field_name', 'fields.area_ha as field_area_ha', 'fields.ranch_id', 'ranches.name as ranch_name');

export interface PlantingListQuery {
  fieldId?: string;
  ranchId?: string;
  season?: string;
  crop?: string;
  limit: number;
  offset: number;
}

export async function listPlantings(db: Knex, organisationId: string, query: PlantingListQuery): Promise<{ items: Planting[]; total: number }> {
  const filter = (q: Knex.QueryBuilder, joined: boolean) => {
    if (query.fieldId) q.where('plantings.field_id', query.fieldId);
    if (query.season) q.where('plantings.season', query.season);
    if (query.crop) q.where('plantings.crop', query.crop);
    if (query.ranchId) {
      if (!joined) q.join('fields', 'fields.id', 'plantings.field_id');
      q.where('fields.ranch_id', query.ranchId);
    }
    return q;
  };
  const rows = await filter(base(db, organisationId), true)
    .orderBy('plantings.season', 'desc')
    .orderBy('ranches.name')
    .orderBy('fields.name')
    .limit(query.limit)
    .offset(query.offset);
  const count = await filter(inOrganisation(db, 'plantings', organisationId), false).count({ n: '*' }).first();
  return { items: (rows as PlantingRow[]).map(toPlanting), total: Number(count?.n ?? 0) };
}

export async function getPlanting(db: Knex, organisationId: string, id: string): Promise<Planting | undefined> {
  const row = await base(db, organisationId).where('plantings.id', id).first();
  return row && toPlanting(row);
}

export async function plantingExists(db: Knex, organisationId: string, fieldId: string, season: string, exceptId?: string) {
  const q = inOrganisation(db, 'plantings', organisationId).where({ field_id: fieldId, season });
  if (exceptId) q.whereNot('id', exceptId);
  return Boolean(await q.first('id'));
}

const toRow = (p: Partial<PlantingWrite>) => {
  const map: Record<string, string> = {
    fieldId: 'field_id',
    season: 'season',
    crop: 'crop',
    variety: 'variety',
    seededOn: 'seeded_on',
    seedingRateKgHa: 'seeding_rate_kg_ha',
    plannedTerminationOn: 'planned_termination_on',
    terminatedOn: 'terminated_on',
    notes: 'notes',
  };
  const row: Record<string, unknown> = {};
  for (const [k, col] of Object.entries(map)) {
    const v = (p as Record<string, unknown>)[k];
    if (v !== undefined) row[col] = v;
  }
  return row;
};

/** Rows per multi-row insert: well under SQLite's and PostgreSQL's limits on bound values. */
const INSERT_CHUNK = 500;

export async function insertPlanting(db: Knex, organisationId: string, p: PlantingWrite): Promise<string> {
  const id = randomUUID();
  const now = nowIso();
  await db('plantings').insert({ id, organisation_id: organisationId, ...toRow(p), created_at: now, updated_at: now });
  return id;
}

/**
 * Inserts many plantings, a few hundred rows per statement (the import: one statement per row took
 * ~26 s for 10,000 rows on PostgreSQL); ids are made here, in the order given.
 */
export async function insertPlantings(db: Knex, organisationId: string, plantings: PlantingWrite[], onChunk: (done: number) => Promise<void> | void = () => {}): Promise<string[]> {
  const now = nowIso();
  const rows = plantings.map((p) => ({ id: randomUUID(), organisation_id: organisationId, ...toRow(p), created_at: now, updated_at: now }));
  for (let i = 0; i < rows.length; i += INSERT_CHUNK) {
    await db('plantings').insert(rows.slice(i, i + INSERT_CHUNK));
    await onChunk(Math.min(rows.length, i + INSERT_CHUNK));
  }
  return rows.map((r) => r.id);
}

export async function updatePlanting(db: Knex, organisationId: string, id: string, changes: Partial<PlantingWrite>): Promise<void> {
  await inOrganisation(db, 'plantings', organisationId).where('id', id).update({ ...toRow(changes), updated_at: nowIso() });
}

/** Earlier variety names of the organisation, for suggestions in the planting form. */
export async function varietySuggestions(db: Knex, organisationId: string): Promise<{ crop: string; variety: string }[]> {
  return inOrganisation(db, 'plantings', organisationId)
    .whereNotNull('variety')
    .distinct('crop', 'variety')
    .orderBy('variety')
    .limit(500);
}

export async function listCrops(db: Knex): Promise<{ code: string; label: string; cropClass: string }[]> {
  const rows: { code: string; label: string; crop_class: string }[] = await db('crops').orderBy('sort_order');
  return rows.map((r) => ({ code: r.code, label: r.label, cropClass: r.crop_class }));
}
