import type { Knex } from 'knex';
import type { Boundary } from '../../shared/registry/boundary';
import { readWalkEstimate, type Walk, type WalkEstimate, type WalkPlant, type WalkStatus } from '../../shared/schemas/walks';
import { inOrganisation, nowIso } from '../platform/scope';
import { isoDay, isoTime, jsonValue } from '../platform/column-values';

/*
 * Field walks, their plants and photos, and the clerk's walk assignments. Columns are snake_case
 * here and camelCase beyond; every query starts from inOrganisation.
 */

const numOrNull = (v: unknown) => (v == null ? null : Number(v));
/** The columns the rules look at (who, which planting, which status, what content). */
export interface WalkRecord {
  id: string;
  plantingId: string;
  samplerId: string;
  status: WalkStatus;
  contentHash: string;
  rejectReason: string | null;
  /** An admin let the walker review this walk themselves. */
  ownReviewWaived: boolean;
}

export async function findWalkRecord(db: Knex, organisationId: string, id: string): Promise<WalkRecord | undefined> {
  const r = await inOrganisation(db, 'field_walks', organisationId)
    .where('id', id)
    .first('id', 'planting_id', 'sampler_id', 'status', 'content_hash', 'reject_reason', 'own_review_waived_by');
  return r ? toWalkRecord(r) : undefined;
}

const toWalkRecord = (r: Record<string, unknown>): WalkRecord => ({
  id: r.id as string,
  plantingId: r.planting_id as string,
  samplerId: r.sampler_id as string,
  status: r.status as WalkStatus,
  contentHash: r.content_hash as string,
  rejectReason: (r.reject_reason as string) ?? null,
  ownReviewWaived: r.own_review_waived_by != null,
});

/** Limits a walk query to what a sampler may see: walks they made, or of plantings assigned to them. */
export function visibleToSampler(db: Knex, q: Knex.QueryBuilder, samplerId: string): Knex.QueryBuilder {
  return q.where((w) =>
    w
      .where('field_walks.sampler_id', samplerId)
      .orWhereExists(
        db('walk_assignments')
          .select(db.raw('1'))
          .whereRaw('walk_assignments.planting_id = field_walks.planting_id')
          .where('walk_assignments.sampler_id', samplerId),
      ),
  );
}

export async function samplerMaySee(db: Knex, organisationId: string, walkId: string, samplerId: string): Promise<boolean> {
  const q = inOrganisation(db, 'field_walks', organisationId).where('field_walks.id', walkId);
  return Boolean(await visibleToSampler(db, q, samplerId).first('field_walks.id'));
}

// Reading whole walks -------------------------------------------------------------------------

const walkQuery = (db: Knex, organisationId: string) =>
  inOrganisation(db, 'field_walks', organisationId)
    .join('plantings', 'plantings.id', 'field_walks.planting_id')
    .join('fields', 'fields.id', 'plantings.field_id')
    .join('ranches', 'ranches.id', 'fields.ranch_id')
    .join('users as sampler', 'sampler.id', 'field_walks.sampler_id')
    .leftJoin('users as reviewer', 'reviewer.id', 'field_walks.reviewed_by')
    .leftJoin('users as waiver', 'waiver.id', 'field_walks.own_review_waived_by')
    .select(
      'field_walks.*',
      'plantings.field_id',
      'plantings.crop',
      'plantings.variety',
      'fields.name as field_name',
      'ranches.name as ranch_name',
      'sampler.name as sampler_name',
      'reviewer.name as reviewer_name',
      'waiver.name as waiver_name',
    );

export const photoUrl = (walkId: string, photoId: string) => `/api/walks/${walkId}/photos/${photoId}`;

/** Rows of a walk's child table (plants, photos) mapped and grouped by their walk. */
function byWalk<T>(rows: Record<string, unknown>[], map: (r: Record<string, unknown>) => T): Map<string, T[]> {
  const of = new Map<string, T[]>();
  for (const r of rows) {
    const list = of.get(r.walk_id as string) ?? [];
    list.push(map(r));
    of.set(r.walk_id as string, list);
  }
  return of;
}

const toPlant = (r: Record<string, unknown>): WalkPlant => ({ stop: Number(r.stop), lengthCm: Number(r.length_cm), lat: numOrNull(r.lat), lon: numOrNull(r.lon) });

/** Walks with their plants and photos, in the order of `rows`. */
async function assemble(db: Knex, organisationId: string, rows: Record<string, unknown>[]): Promise<Walk[]> {
  if (!rows.length) return [];
  const ids = rows.map((r) => r.id as string);
  const plantsOf = byWalk(await inOrganisation(db, 'walk_plants', organisationId).whereIn('walk_id', ids).orderBy('stop'), toPlant);
  const photosOf = byWalk(await inOrganisation(db, 'walk_photos', organisationId).whereIn('walk_id', ids).orderBy('stop'), (r) => photoJson(toPhoto(r)));
  return rows.map((r) => toWalk(r, plantsOf.get(r.id as string) ?? [], photosOf.get(r.id as string) ?? []));
}

/** A row of walkQuery (the walk with its planting's, field's, ranch's and people's names) as the API's walk. */
function toWalk(r: Record<string, unknown>, plants: WalkPlant[], photos: Walk['photos']): Walk {
  return {
    id: r.id as string,
    plantingId: r.planting_id as string,
    fieldId: r.field_id as string,
    fieldName: r.field_name as string,
    ranchName: r.ranch_name as string,
    crop: r.crop as string,
    variety: (r.variety as string) ?? null,
    walkedOn: isoDay(r.walked_on)!,
    stage: (r.stage as string) ?? null,
    notes: (r.notes as string) ?? null,
    status: r.status as WalkStatus,
    rejectReason: (r.reject_reason as string) ?? null,
    sampler: { id: r.sampler_id as string, name: r.sampler_name as string },
    plants,
    photos,
    skippedStops: jsonValue<number[]>(r.skipped_stops) ?? [],
    plan: r.plan_seed ? { seed: r.plan_seed as string, stops: Number(r.plan_stops), edgeMarginM: Number(r.plan_edge_margin_m) } : null,
    estimate: r.estimate ? readWalkEstimate(jsonValue<WalkEstimate>(r.estimate)!) : null,
    createdAt: isoTime(r.created_at)!,
    submittedAt: isoTime(r.submitted_at),
    reviewedAt: isoTime(r.reviewed_at),
    reviewedBy: r.reviewed_by ? { id: r.reviewed_by as string, name: (r.reviewer_name as string) ?? '' } : null,
    ownReviewWaiver: r.own_review_waived_by
      ? { by: { id: r.own_review_waived_by as string, name: (r.waiver_name as string) ?? '' }, at: isoTime(r.own_review_waived_at)!, reason: r.own_review_waiver_reason as string }
      : null,
  };
}

export async function getWalk(db: Knex, organisationId: string, id: string): Promise<Walk | undefined> {
  const row = await walkQuery(db, organisationId).where('field_walks.id', id).first();
  return row ? (await assemble(db, organisationId, [row]))[0] : undefined;
}

export interface WalkListQuery {
  status?: WalkStatus;
  plantingId?: string;
  /** Walks of this ranch's fields (the office's walk review). */
  ranchId?: string;
  /** Walks made by this user (the office's walk review). */
  samplerId?: string;
  /** Only what this sampler may see (their own walks and those of plantings assigned to them). */
  visibleTo?: string;
  /** Oldest first, as a review queue is worked through; newest first otherwise. */
  oldestFirst?: boolean;
  limit: number;
  offset: number;
}

/** Newest walk first, unless `oldestFirst`. */
export async function listWalks(db: Knex, organisationId: string, query: WalkListQuery): Promise<{ items: Walk[]; total: number }> {
  const filter = (q: Knex.QueryBuilder) => {
    if (query.status) q.where('field_walks.status', query.status);
    if (query.plantingId) q.where('field_walks.planting_id', query.plantingId);
    if (query.ranchId) {
      const ofRanch = inOrganisation(db, 'plantings', organisationId)
        .join('fields', 'fields.id', 'plantings.field_id')
        .where('fields.ranch_id', query.ranchId)
        .select('plantings.id');
      q.whereIn('field_walks.planting_id', ofRanch);
    }
    if (query.samplerId) q.where('field_walks.sampler_id', query.samplerId);
    if (query.visibleTo) visibleToSampler(db, q, query.visibleTo);
    return q;
  };
  const count = await filter(inOrganisation(db, 'field_walks', organisationId)).count({ n: '*' }).first();
  const rows = await filter(walkQuery(db, organisationId))
    .orderBy('field_walks.walked_on', query.oldestFirst ? 'asc' : 'desc')
    .orderBy('field_walks.created_at', query.oldestFirst ? 'asc' : 'desc')
    .orderBy('field_walks.id')
    .limit(query.limit)
    .offset(query.offset);
  return { items: await assemble(db, organisationId, rows), total: Number(count?.n ?? 0) };
}

/** The latest walk (by walk date, then creation) of each planting given. */
export async function latestWalksOf(
  db: Knex,
  organisationId: string,
  plantingIds: string[],
): Promise<Map<string, { id: string; status: WalkStatus; walkedOn: string; rejectReason: string | null }>> {
  const latest = new Map<string, { id: string; status: WalkStatus; walkedOn: string; rejectReason: string | null }>();
  if (!plantingIds.length) return latest;
  const rows = await inOrganisation(db, 'field_walks', organisationId)
    .whereIn('planting_id', plantingIds)
    .orderBy('walked_on', 'desc')
    .orderBy('created_at', 'desc')
    .select('id', 'planting_id', 'status', 'walked_on', 'reject_reason');
  for (const r of rows) {
    if (!latest.has(r.planting_id)) latest.set(r.planting_id, { id: r.id, status: r.status, walkedOn: isoDay(r.walked_on)!, rejectReason: r.reject_reason ?? null });
  }
  return latest;
}

// Writing walks -------------------------------------------------------------------------------

export interface WalkInsert {
  id: string;
  plantingId: string;
  samplerId: string;
  walkedOn: string;
  stage: string | null;
  notes: string | null;
  status: WalkStatus;
  contentHash: string;
  estimate: WalkEstimate | null;
  plants: WalkPlant[];
  /** Ascending, without repeats; empty or absent stores null. */
  skippedStops?: number[];
  /** The walk plan's seed, stop count and edge margin; absent when the phone sent no seed. */
  plan?: { seed: string; stops: number; edgeMarginM: number } | null;
  createdAt?: string;
  submittedAt?: string | null;
  reviewedBy?: string | null;
  reviewedAt?: string | null;
}

/** Inserts the walk and its plants; a walk with this id already there fails on the primary key. */
export async function insertWalk(db: Knex, organisationId: string, w: WalkInsert): Promise<void> {
  await db('field_walks').insert({
    id: w.id,
    organisation_id: organisationId,
    planting_id: w.plantingId,
    sampler_id: w.samplerId,
    walked_on: w.walkedOn,
    stage: w.stage,
    notes: w.notes,
    status: w.status,
    reject_reason: null,
    content_hash: w.contentHash,
    estimate: w.estimate ? JSON.stringify(w.estimate) : null,
    skipped_stops: w.skippedStops?.length ? JSON.stringify(w.skippedStops) : null,
    plan_seed: w.plan?.seed ?? null,
    plan_stops: w.plan?.stops ?? null,
    plan_edge_margin_m: w.plan?.edgeMarginM ?? null,
    created_at: w.createdAt ?? nowIso(),
    submitted_at: w.submittedAt ?? null,
    reviewed_by: w.reviewedBy ?? null,
    reviewed_at: w.reviewedAt ?? null,
  });
  await db('walk_plants').insert(
    w.plants.map((p) => ({ walk_id: w.id, organisation_id: organisationId, stop: p.stop, length_cm: p.lengthCm, lat: p.lat ?? null, lon: p.lon ?? null })),
  );
}

/**
 * Moves a walk from one status to the next. The expected status sits in the UPDATE itself, so of
 * two reviewers acting at once only one wins; false when the walk was no longer `from`.
 */
export async function changeWalkStatus(
  db: Knex,
  organisationId: string,
  id: string,
  from: WalkStatus,
  to: { status: WalkStatus; submittedAt?: string; reviewedBy?: string; reviewedAt?: string; rejectReason?: string | null },
): Promise<boolean> {
  const set: Record<string, unknown> = { status: to.status };
  if (to.submittedAt !== undefined) set.submitted_at = to.submittedAt;
  if (to.reviewedBy !== undefined) set.reviewed_by = to.reviewedBy;
  if (to.reviewedAt !== undefined) set.reviewed_at = to.reviewedAt;
  if (to.rejectReason !== undefined) set.reject_reason = to.rejectReason;
  const count = await inOrganisation(db, 'field_walks', organisationId).where({ id, status: from }).update(set);
  return count === 1;
}

/** Records an admin's waiver of the own-walk rule on a walk still waiting for review; false when it no longer is, or is waived already. */
export async function recordOwnReviewWaiver(db: Knex, organisationId: string, id: string, waiver: { by: string; at: string; reason: string }): Promise<boolean> {
  const count = await inOrganisation(db, 'field_walks', organisationId)
    .where({ id, status: 'submitted' })
    .whereNull('own_review_waived_by')
    .update({ own_review_waived_by: waiver.by, own_review_waived_at: waiver.at, own_review_waiver_reason: waiver.reason });
  return count === 1;
}

export async function walkHasStop(db: Knex, organisationId: string, walkId: string, stop: number): Promise<boolean> {
  return Boolean(await inOrganisation(db, 'walk_plants', organisationId).where({ walk_id: walkId, stop }).first('stop'));
}

// Photos --------------------------------------------------------------------------------------

export interface WalkPhotoRecord {
  id: string;
  walkId: string;
  stop: number;
  path: string;
  contentType: string;
  size: number;
}

const toPhoto = (r: Record<string, unknown>): WalkPhotoRecord => ({
  id: r.id as string,
  walkId: r.walk_id as string,
  stop: Number(r.stop),
  path: r.path as string,
  contentType: r.content_type as string,
  size: Number(r.size),
});

/** A photo as the API lists it with its walk. */
const photoJson = (p: WalkPhotoRecord): Walk['photos'][number] => ({ id: p.id, stop: p.stop, url: photoUrl(p.walkId, p.id), contentType: p.contentType, size: p.size });

export async function getPhoto(db: Knex, organisationId: string, walkId: string, photoId: string): Promise<WalkPhotoRecord | undefined> {
  const r = await inOrganisation(db, 'walk_photos', organisationId).where({ walk_id: walkId, id: photoId }).first();
  return r ? toPhoto(r) : undefined;
}

export async function photoAtStop(db: Knex, organisationId: string, walkId: string, stop: number): Promise<WalkPhotoRecord | undefined> {
  const r = await inOrganisation(db, 'walk_photos', organisationId).where({ walk_id: walkId, stop }).first();
  return r ? toPhoto(r) : undefined;
}

export async function deletePhoto(db: Knex, organisationId: string, photoId: string): Promise<void> {
  await inOrganisation(db, 'walk_photos', organisationId).where('id', photoId).delete();
}

export async function insertPhoto(db: Knex, organisationId: string, p: WalkPhotoRecord): Promise<void> {
  await db('walk_photos').insert({
    id: p.id,
    walk_id: p.walkId,
    organisation_id: organisationId,
    stop: p.stop,
    path: p.path,
    content_type: p.contentType,
    size: p.size,
    created_at: nowIso(),
  });
}

// Walk assignments ----------------------------------------------------------------------------

export interface WalkAssignment {
  plantingId: string;
  samplerId: string;
  samplerName: string;
  dueOn: string | null;
  createdAt: string;
}

export async function getWalkAssignment(db: Knex, organisationId: string, plantingId: string, samplerId: string): Promise<WalkAssignment | undefined> {
  const r = await inOrganisation(db, 'walk_assignments', organisationId)
    .join('users', 'users.id', 'walk_assignments.sampler_id')
    .where({ 'walk_assignments.planting_id': plantingId, 'walk_assignments.sampler_id': samplerId })
    .first('walk_assignments.*', 'users.name as sampler_name');
  if (!r) return undefined;
  return { plantingId: r.planting_id, samplerId: r.sampler_id, samplerName: r.sampler_name, dueOn: isoDay(r.due_on), createdAt: isoTime(r.created_at)! };
}

/** Assigns (or re-dates) a planting to a sampler. */
export async function upsertWalkAssignment(
  db: Knex,
  organisationId: string,
  a: { plantingId: string; samplerId: string; dueOn: string | null; createdBy: string | null },
): Promise<void> {
  await db('walk_assignments')
    .insert({ organisation_id: organisationId, planting_id: a.plantingId, sampler_id: a.samplerId, due_on: a.dueOn, created_by: a.createdBy, created_at: nowIso() })
    .onConflict(['planting_id', 'sampler_id'])
    .merge(['due_on']);
}

export async function deleteWalkAssignment(db: Knex, organisationId: string, plantingId: string, samplerId: string): Promise<boolean> {
  const n = await inOrganisation(db, 'walk_assignments', organisationId).where({ planting_id: plantingId, sampler_id: samplerId }).delete();
  return n > 0;
}

/** Planting id → due date of the plantings assigned to this sampler. */
export async function assignmentsOfSampler(db: Knex, organisationId: string, samplerId: string): Promise<Map<string, string | null>> {
  const rows = await inOrganisation(db, 'walk_assignments', organisationId).where('sampler_id', samplerId).select('planting_id', 'due_on');
  return new Map(rows.map((r: { planting_id: string; due_on: unknown }) => [r.planting_id, isoDay(r.due_on)]));
}

// The sampler's "today" list ------------------------------------------------------------------

export interface DuePlanting {
  plantingId: string;
  fieldId: string;
  fieldName: string;
  ranchId: string;
  ranchName: string;
  areaHa: number;
  boundary: Boundary | null;
  season: string;
  crop: string;
  variety: string | null;
  seededOn: string;
  plannedTerminationOn: string | null;
}

/** A season's plantings not yet terminated (or terminated today or later), by ranch and field name. */
export async function duePlantings(db: Knex, organisationId: string, opts: { season: string; today: string; q?: string }): Promise<DuePlanting[]> {
  const q = inOrganisation(db, 'plantings', organisationId)
    .join('fields', 'fields.id', 'plantings.field_id')
    .join('ranches', 'ranches.id', 'fields.ranch_id')
    .where('plantings.season', opts.season)
    .where((w) => w.whereNull('plantings.terminated_on').orWhere('plantings.terminated_on', '>=', opts.today))
    .select(
      'plantings.id',
      'plantings.field_id',
      'fields.name as field_name',
      'fields.ranch_id',
      'ranches.name as ranch_name',
      'fields.area_ha',
      'fields.boundary',
      'plantings.season',
      'plantings.crop',
      'plantings.variety',
      'plantings.seeded_on',
      'plantings.planned_termination_on',
    )
    .orderBy('ranches.name')
    .orderBy('fields.name');
  if (opts.q) q.whereRaw('lower(fields.name) like ?', [`%${opts.q.toLowerCase()}%`]);
  const rows: Record<string, unknown>[] = await q;
  return rows.map((r) => ({
    plantingId: r.id as string,
    fieldId: r.field_id as string,
    fieldName: r.field_name as string,
    ranchId: r.ranch_id as string,
    ranchName: r.ranch_name as string,
    areaHa: Number(r.area_ha),
    boundary: jsonValue<Boundary>(r.boundary),
    season: r.season as string,
    crop: r.crop as string,
    variety: (r.variety as string) ?? null,
    seededOn: isoDay(r.seeded_on)!,
    plannedTerminationOn: isoDay(r.planned_termination_on),
  }));
}
