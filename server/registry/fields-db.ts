import { randomUUID } from 'node:crypto';
import type { Knex } from 'knex';
import type { Boundary } from '../../shared/registry/boundary';
import { inOrganisation, nowIso } from '../platform/scope';
import { jsonValue } from '../platform/column-values';

export interface Field {
  id: string;
  ranchId: string;
  ranchName: string;
  name: string;
  areaHa: number;
  boundary: Boundary | null;
  boundaryAreaHa: number | null;
  notes: string | null;
  createdAt: string;
  updatedAt: string;
}

export interface FieldWrite {
  ranchId: string;
  name: string;
  areaHa: number;
  boundary?: Boundary | null;
  boundaryAreaHa?: number | null;
  notes?: string | null;
}

type FieldRow = Record<string, unknown>;

function toField(r: FieldRow): Field {
  return {
    id: r.id as string,
    ranchId: r.ranch_id as string,
    ranchName: r.ranch_name as string,
    name: r.name as string,
    areaHa: Number(r.area_ha),
    boundary: jsonValue<Boundary>(r.boundary),
    boundaryAreaHa: r.boundary_area_ha == null ? null : Number(r.boundary_area_ha),
    notes: (r.notes as string) ?? null,
    createdAt: r.created_at as string,
    updatedAt: r.updated_at as string,
  };
}

const base = (db: Knex, organisationId: string) =>
  inOrganisation(db, 'fields', organisationId)
    .join('ranches', 'ranches.id', 'fields.ranch_id')
    .select('fields.*', 'ranches.name as ranch_name');

export interface FieldListQuery {
  ranchId?: string;
  q?: string;
  limit: number;
  offset: number;
}

export async function listFields(db: Knex, organisationId: string, query: FieldListQuery): Promise<{ items: Field[]; total: number }> {
  const filter = (q: Knex.QueryBuilder) => {
    if (query.ranchId) q.where('fields.ranch_id', query.ranchId);
    if (query.q) q.whereRaw('lower(fields.name) like ?', [`%${query.q.toLowerCase()}%`]);
    return q;
  };
  const rows = await filter(base(db, organisationId)).orderBy('ranches.name').orderBy('fields.name').limit(query.limit).offset(query.offset);
  const count = await filter(inOrganisation(db, 'fields', organisationId)).count({ n: '*' }).first();
  return { items: (rows as FieldRow[]).map(toField), total: Number(count?.n ?? 0) };
}

export async function getField(db: Knex, organisationId: string, id: string): Promise<Field | undefined> {
  const row = await base(db, organisationId).where('fields.id', id).first();
  return row && toField(row);
}

export async function fieldNameTaken(db: Knex, organisationId: string, ranchId: string, name: string, exceptId?: string) {
  const q = inOrganisation(db, 'fields', organisationId).where('ranch_id', ranchId).whereRaw('lower(name) = ?', [name.trim().toLowerCase()]);
  if (exceptId) q.whereNot('id', exceptId);
  return Boolean(await q.first('id'));
}

const toRow = (f: Partial<FieldWrite>) => {
  const row: Record<string, unknown> = {};
  if (f.ranchId !== undefined) row.ranch_id = f.ranchId;
  if (f.name !== undefined) row.name = f.name;
  if (f.areaHa !== undefined) row.area_ha = f.areaHa;
  if (f.boundary !== undefined) row.boundary = f.boundary ? JSON.stringify(f.boundary) : null;
  if (f.boundaryAreaHa !== undefined) row.boundary_area_ha = f.boundaryAreaHa;
  if (f.notes !== undefined) row.notes = f.notes;
  return row;
};

export async function insertField(db: Knex, organisationId: string, field: FieldWrite): Promise<string> {
  const id = randomUUID();
  const now = nowIso();
  await db('fields').insert({ id, organisation_id: organisationId, ...toRow(field), created_at: now, updated_at: now });
  return id;
}

/** Inserts many fields, 500 rows per statement; ids are made here, in the order given. */
export async function insertFields(db: Knex, organisationId: string, fields: FieldWrite[]): Promise<string[]> {
  const now = nowIso();
  const rows = fields.map((f) => ({ id: randomUUID(), organisation_id: organisationId, ...toRow(f), created_at: now, updated_at: now }));
  for (let i = 0; i < rows.length; i += 500) await db('fields').insert(rows.slice(i, i + 500));
  return rows.map((r) => r.id);
}

export async function updateField(db: Knex, organisationId: string, id: string, changes: Partial<FieldWrite>): Promise<void> {
  await inOrganisation(db, 'fields', organisationId).where('id', id).update({ ...toRow(changes), updated_at: nowIso() });
}

export async function countFieldsOfRanch(db: Knex, organisationId: string, ranchId: string): Promise<number> {
  const row = await inOrganisation(db, 'fields', organisationId).where('ranch_id', ranchId).count({ n: '*' }).first();
  return Number(row?.n ?? 0);
}
