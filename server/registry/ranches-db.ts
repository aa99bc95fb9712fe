import { randomUUID } from 'node:crypto';
import type { Knex } from 'knex';
import { inOrganisation, nowIso } from '../platform/scope';

export interface Ranch {
  id: string;
  name: string;
  code: string | null;
  county: string | null;
  notes: string | null;
  contactEmails: string[];
  fieldCount: number;
  totalAreaHa: number;
  /** Area of the ranch's fields with a planting in the given season. */
  coverCroppedAreaHa: number;
  createdAt: string;
  updatedAt: string;
}

export interface RanchWrite {
  name: string;
  code?: string | null;
  county?: string | null;
  notes?: string | null;
  contactEmails?: string[];
}

export const RANCH_SORTS = ['name', 'code', 'county', 'field_count', 'total_area_ha', 'cover_cropped_area_ha'] as const;
export type RanchSort = (typeof RANCH_SORTS)[number];

export interface RanchListQuery {
  q?: string;
  season: string;
  sort?: RanchSort;
  dir?: 'asc' | 'desc';
  limit: number;
  offset: number;
}

// Field count, total area and this season's cover-cropped area come from one grouped query.
function withTotals(db: Knex, organisationId: string, season: string) {
  return inOrganisation(db, 'ranches', organisationId)
    .leftJoin('fields', 'fields.ranch_id', 'ranches.id')
    .leftJoin('plantings', (j) => j.on('plantings.field_id', 'fields.id').andOn('plantings.season', db.raw('?', [season])))
    .groupBy('ranches.id')
    .select(
      'ranches.*',
      db.raw('count(fields.id) as field_count'),
      db.raw('coalesce(sum(fields.area_ha), 0) as total_area_ha'),
      db.raw('coalesce(sum(case when plantings.id is not null then fields.area_ha else 0 end), 0) as cover_cropped_area_ha'),
    );
}

type RanchRow = Record<string, unknown> & { id: string; contact_emails: string | null };

function toRanch(r: RanchRow): Ranch {
  return {
    id: r.id,
    name: r.name as string,
    code: (r.code as string) ?? null,
    county: (r.county as string) ?? null,
    notes: (r.notes as string) ?? null,
    contactEmails: r.contact_emails ? r.contact_emails.split(',') : [],
    fieldCount: Number(r.field_count ?? 0),
    totalAreaHa: Number(r.total_area_ha ?? 0),
    coverCroppedAreaHa: Number(r.cover_cropped_area_ha ?? 0),
    createdAt: r.created_at as string,
    updatedAt: r.updated_at as string,
  };
}

export async function listRanches(db: Knex, organisationId: string, query: RanchListQuery): Promise<{ items: Ranch[]; total: number }> {
  const filter = (q: Knex.QueryBuilder) => {
    if (query.q) {
      const like = `%${query.q.toLowerCase()}%`;
      q.where((w) =>
        w.whereRaw('lower(ranches.name) like ?', [like]).orWhereRaw('lower(ranches.code) like ?', [like]).orWhereRaw('lower(ranches.county) like ?', [like]),
      );
    }
    return q;
  };
  const sort = query.sort ?? 'name';
  const rows = await filter(withTotals(db, organisationId, query.season))
    .orderBy(sort === 'name' || sort === 'code' || sort === 'county' ? `ranches.${sort}` : sort, query.dir ?? 'asc')
    .orderBy('ranches.name')
    .limit(query.limit)
    .offset(query.offset);
  const count = await filter(inOrganisation(db, 'ranches', organisationId)).count({ n: '*' }).first();
  return { items: (rows as RanchRow[]).map(toRanch), total: Number(count?.n ?? 0) };
}

export async function getRanch(db: Knex, organisationId: string, id: string, season: string): Promise<Ranch | undefined> {
  const row = await withTotals(db, organisationId, season).where('ranches.id', id).first();
  return row && toRanch(row as RanchRow);
}

export async function ranchNameTaken(db: Knex, organisationId: string, name: string, exceptId?: string): Promise<boolean> {
  const q = inOrganisation(db, 'ranches', organisationId).whereRaw('lower(name) = ?', [name.trim().toLowerCase()]);
  if (exceptId) q.whereNot('id', exceptId);
  return Boolean(await q.first('id'));
}

const toRow = (r: Partial<RanchWrite>) => {
  const row: Record<string, unknown> = {};
  if (r.name !== undefined) row.name = r.name;
  if (r.code !== undefined) row.code = r.code;
  if (r.county !== undefined) row.county = r.county;
  if (r.notes !== undefined) row.notes = r.notes;
  if (r.contactEmails !== undefined) row.contact_emails = r.contactEmails.length ? r.contactEmails.join(',') : null;
  return row;
};

export async function insertRanch(db: Knex, organisationId: string, ranch: RanchWrite): Promise<string> {
  const id = randomUUID();
  const now = nowIso();
  await db('ranches').insert({ id, organisation_id: organisationId, ...toRow(ranch), created_at: now, updated_at: now });
  return id;
}

export async function updateRanch(db: Knex, organisationId: string, id: string, changes: Partial<RanchWrite>): Promise<void> {
  await inOrganisation(db, 'ranches', organisationId).where('id', id).update({ ...toRow(changes), updated_at: nowIso() });
}

export async function deleteRanch(db: Knex, organisationId: string, id: string): Promise<void> {
  await inOrganisation(db, 'ranches', organisationId).where('id', id).del();
}

export async function ranchOptions(db: Knex, organisationId: string): Promise<{ id: string; name: string }[]> {
  return inOrganisation(db, 'ranches', organisationId).orderBy('name').select('id', 'name');
}
