import type { Knex } from 'knex';
import { inOrganisation, nowIso } from '../platform/scope';
import { jsonValue } from '../platform/column-values';

export type EntityType = 'ranch' | 'field' | 'planting';
export type ChangeAction = 'create' | 'update' | 'delete' | 'import';

export interface ChangeEntry {
  seq: number;
  entityType: EntityType;
  entityId: string;
  action: ChangeAction;
  userId: string | null;
  userName: string | null;
  at: string;
  before: Record<string, unknown> | null;
  after: Record<string, unknown> | null;
  summary: string;
}

export interface ChangeWrite {
  entityType: EntityType;
  entityId: string;
  action: ChangeAction;
  user: { id: string; name: string } | null;
  before: object | null;
  after: object | null;
  summary: string;
}

/** A change as its change_history row, stamped `at`. */
const changeRow = (organisationId: string, c: ChangeWrite, at: string) => ({
  organisation_id: organisationId,
  entity_type: c.entityType,
  entity_id: c.entityId,
  action: c.action,
  user_id: c.user?.id ?? null,
  user_name: c.user?.name ?? null,
  at,
  before: c.before ? JSON.stringify(c.before) : null,
  after: c.after ? JSON.stringify(c.after) : null,
  summary: c.summary.slice(0, 500),
});

/** Appends one entry. There is no update or delete function: the history is append-only. */
export async function appendChange(db: Knex, organisationId: string, c: ChangeWrite): Promise<void> {
  await db('change_history').insert(changeRow(organisationId, c, nowIso()));
}

/** Appends many entries in order, 500 per statement (an import's). */
export async function appendChanges(db: Knex, organisationId: string, changes: ChangeWrite[]): Promise<void> {
  const at = nowIso();
  const rows = changes.map((c) => changeRow(organisationId, c, at));
  for (let i = 0; i < rows.length; i += 500) await db('change_history').insert(rows.slice(i, i + 500));
}

export interface HistoryQuery {
  entityType?: EntityType;
  entityId?: string;
  userId?: string;
  action?: ChangeAction;
  from?: string; // YYYY-MM-DD
  to?: string;
  limit: number;
  offset: number;
}

const toEntry = (r: Record<string, unknown>): ChangeEntry => ({
  seq: Number(r.seq),
  entityType: r.entity_type as EntityType,
  entityId: r.entity_id as string,
  action: r.action as ChangeAction,
  userId: (r.user_id as string) ?? null,
  userName: (r.user_name as string) ?? null,
  at: r.at as string,
  before: jsonValue(r.before),
  after: jsonValue(r.after),
  summary: r.summary as string,
});

export async function listHistory(db: Knex, organisationId: string, q: HistoryQuery): Promise<{ items: ChangeEntry[]; total: number }> {
  const filter = (b: Knex.QueryBuilder) => {
    if (q.entityType) b.where('entity_type', q.entityType);
    if (q.entityId) b.where('entity_id', q.entityId);
    if (q.userId) b.where('user_id', q.userId);
    if (q.action) b.where('action', q.action);
    if (q.from) b.where('at', '>=', `${q.from}T00:00:00`);
    if (q.to) b.where('at', '<=', `${q.to}T23:59:59.999Z`);
    return b;
  };
  const rows = await filter(inOrganisation(db, 'change_history', organisationId)).orderBy('seq', 'desc').limit(q.limit).offset(q.offset);
  const count = await filter(inOrganisation(db, 'change_history', organisationId)).count({ n: '*' }).first();
  return { items: rows.map(toEntry), total: Number(count?.n ?? 0) };
}

export async function historyAuthors(db: Knex, organisationId: string): Promise<{ id: string; name: string }[]> {
  return inOrganisation(db, 'change_history', organisationId)
    .whereNotNull('user_id')
    .distinct({ id: 'user_id', name: 'user_name' })
    .orderBy('user_name');
}

export interface RegistryChange {
  seq: number;
  at: string;
  entityType: EntityType;
  entityId: string;
  /** The record as it was before this change; null when the change created it. */
  before: Record<string, unknown> | null;
}

/** Changes to ranches, fields and plantings made after `at` (an ISO time), newest first: what undoes the registry back to that moment. */
export async function registryChangesAfter(db: Knex, organisationId: string, at: string): Promise<RegistryChange[]> {
  const rows = await inOrganisation(db, 'change_history', organisationId)
    .where('at', '>', at)
    .whereIn('entity_type', ['ranch', 'field', 'planting'])
    .orderBy('seq', 'desc')
    .select('seq', 'at', 'entity_type', 'entity_id', 'before');
  return rows.map((r: Record<string, unknown>) => ({
    seq: Number(r.seq),
    at: new Date(r.at as string | Date).toISOString(), // a string on SQLite, a Date on PostgreSQL
    entityType: r.entity_type as EntityType,
    entityId: r.entity_id as string,
    before: jsonValue<Record<string, unknown>>(r.before),
  }));
}
