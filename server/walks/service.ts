import { createHash, randomBytes, randomUUID } from 'node:crypto';
import path from 'node:path';
import type { Knex } from 'knex';
import type { UserContext } from '../platform/context';
import { allows } from '../platform/permissions';
import { HttpError } from '../platform/errors';
import type { ObjectStore, StoredObject } from '../platform/object-store';
import { sniffImageType } from './image-type';
import { daysBetween } from '../../shared/calc/dates';
import { addDaysIso, seasonOfDate, todayIso } from '../../shared/registry/season';
import type { TodayItem, Walk, WalkCreate, WalkStatus } from '../../shared/schemas/walks';
import { assignedCalibrationFor } from '../calibrations/public';
import { getPlanting } from '../registry/public';
import { nowIso } from '../platform/scope';
import { getUser } from '../people/public';
import { currentCreditRule } from '../rules/public';
import * as walks from './db';
import { estimateSnapshot } from './estimate';
import { inTransaction } from '../platform/database';

/**
 * Field-walk rules that span tables: who may read and change a walk, the idempotent create with
 * its estimate snapshot, the status steps, one photo per stop in the file store, assignments and the
 * sampler's "today" list.
 */
export type WalkActor = Pick<UserContext, 'id' | 'organisationId' | 'can'>;

const invalid = (field: string, message: string) => new HttpError('invalid', message, { [field]: message });
const blankToNull = (v: string | null | undefined) => (v == null || v === '' ? null : v);

/** A unique-key violation on SQLite or PostgreSQL. */
function isUniqueViolation(err: unknown): boolean {
  const code = (err as { code?: string })?.code;
  return code === 'SQLITE_CONSTRAINT_PRIMARYKEY' || code === 'SQLITE_CONSTRAINT_UNIQUE' || code === '23505';
}

/** The skipped stops as stored: ascending, each once. */
const skippedOf = (input: WalkCreate): number[] => [...new Set(input.skippedStops ?? [])].sort((a, b) => a - b);

/**
 * Canonical hash of what a client posts, so a re-post of the same walk can be told from a different
 * one. Skipped stops count only when there are some, so walks stored before phones sent them (and
 * re-posts from older phones) keep their hash.
 */
export function walkContentHash(input: WalkCreate): string {
  const skipped = skippedOf(input);
  const canonical = {
    plantingId: input.plantingId,
    walkedOn: input.walkedOn,
    stage: blankToNull(input.stage),
    notes: blankToNull(input.notes),
    plants: [...input.plants].sort((a, b) => a.stop - b.stop).map((p) => [p.stop, p.lengthCm, p.lat ?? null, p.lon ?? null]),
    ...(skipped.length && { skippedStops: skipped }),
  };
  return createHash('sha256').update(JSON.stringify(canonical)).digest('hex');
}

// Reading -------------------------------------------------------------------------------------

async function mayRead(db: Knex, actor: WalkActor, walk: walks.WalkRecord): Promise<boolean> {
  if (actor.can('walks.readAll')) return true;
  return walk.samplerId === actor.id || walks.samplerMaySee(db, actor.organisationId, walk.id, actor.id);
}

/** The walk, if this user may read it; 404 otherwise (another organisation's id included). */
async function readable(db: Knex, actor: WalkActor, id: string): Promise<walks.WalkRecord> {
  const walk = await walks.findWalkRecord(db, actor.organisationId, id);
  if (!walk || !(await mayRead(db, actor, walk))) throw new HttpError('not_found');
  return walk;
}

/** Its author, a clerk or an admin may change a walk (others who may read it: 403). */
async function changeable(db: Knex, actor: WalkActor, id: string): Promise<walks.WalkRecord> {
  const walk = await readable(db, actor, id);
  if (walk.samplerId !== actor.id && !actor.can('walks.review')) throw new HttpError('forbidden', 'Only the sampler who made this walk, a clerk or an admin can change it.');
  return walk;
}

const stored = async (db: Knex, actor: WalkActor, id: string): Promise<Walk> => (await walks.getWalk(db, actor.organisationId, id))!;

export async function getWalkFor(db: Knex, actor: WalkActor, id: string): Promise<Walk> {
  await readable(db, actor, id);
  return stored(db, actor, id);
}

export async function listWalksFor(
  db: Knex,
  actor: WalkActor,
  query: { status?: WalkStatus; plantingId?: string; limit: number; offset: number },
): Promise<{ items: Walk[]; total: number }> {
  return walks.listWalks(db, actor.organisationId, { ...query, visibleTo: actor.can('walks.readAll') ? undefined : actor.id });
}

// Creating (idempotent) -----------------------------------------------------------------------

/**
 * Stores a walk the capture app made, with its estimate snapshot. The client's UUID is the
 * primary key: a re-post of the same content answers the stored walk (`created: false`), never a
 * second record; the same id with other content, or an id taken in another organisation, is a
 * conflict. Concurrent re-posts race on the primary key, and the losers read and compare.
 */
export async function createWalk(db: Knex, actor: WalkActor, input: WalkCreate): Promise<{ walk: Walk; created: boolean }> {
  const hash = walkContentHash(input);
  const existing = async (found: walks.WalkRecord | undefined) => {
    // Another organisation's id finds nothing here: a conflict, without saying whose it is.
    if (!found || found.contentHash !== hash || !(await mayRead(db, actor, found))) {
      throw new HttpError('conflict', 'A different walk with this id is already stored. Make a new id for a new walk.');
    }
    return { walk: await stored(db, actor, found.id), created: false };
  };

  const planting = await getPlanting(db, actor.organisationId, input.plantingId);
  if (!planting) throw invalid('plantingId', 'That planting was not found.');
  // A phone's date may run a day ahead of the server's UTC date, never more.
  if (input.walkedOn > addDaysIso(todayIso(), 1)) throw invalid('walkedOn', 'The walk date is in the future.');
  const measured = new Set(input.plants.map((p) => p.stop));
  const both = skippedOf(input).filter((s) => measured.has(s));
  if (both.length) {
    throw invalid('skippedStops', `Stop${both.length === 1 ? '' : 's'} ${both.join(', ')} ${both.length === 1 ? 'has' : 'have'} a plant measured, so ${both.length === 1 ? 'it was' : 'they were'} not skipped.`);
  }
  const highest = Math.max(...input.plants.map((p) => p.stop), ...(input.skippedStops ?? []));
  if (input.planStops !== undefined && input.planStops < highest) {
    throw invalid('planStops', `The plan had ${input.planStops} stops, but stop ${highest} was measured or skipped.`);
  }
  const before = await walks.findWalkRecord(db, actor.organisationId, input.id);
  if (before) return existing(before);

  const estimate = await estimateSnapshot(
    db,
    actor.organisationId,
    planting,
    input.plants.map((p) => p.lengthCm),
  );
  const plan = input.planSeed ? await planOf(db, actor.organisationId, input) : null;
  try {
    await inTransaction(db, async (trx) => {
      await walks.insertWalk(trx, actor.organisationId, {
        id: input.id,
        plantingId: planting.id,
        samplerId: actor.id,
        walkedOn: input.walkedOn,
        stage: blankToNull(input.stage),
        notes: blankToNull(input.notes),
        status: 'draft',
        contentHash: hash,
        estimate,
        plants: input.plants,
        skippedStops: skippedOf(input),
        plan,
      });
    });
  } catch (err) {
    if (!isUniqueViolation(err)) throw err;
    return existing(await walks.findWalkRecord(db, actor.organisationId, input.id));
  }
  return { walk: await stored(db, actor, input.id), created: true };
}

/**
 * The plan a walk was drawn from, kept so the office can redraw its stops: the phone's seed and
 * stop count (older phones send no count: the highest stop measured or skipped), and the edge
 * margin of the credit rule in effect, the one the phone planned with.
 */
async function planOf(db: Knex, organisationId: string, input: WalkCreate) {
  const highest = Math.max(...input.plants.map((p) => p.stop), ...(input.skippedStops ?? []));
  const rule = await currentCreditRule(db, organisationId);
  return { seed: input.planSeed!, stops: input.planStops ?? highest, edgeMarginM: rule.edgeMarginM };
}

// Status steps --------------------------------------------------------------------------------

/** draft → submitted; already submitted answers the walk unchanged; reviewed walks are a conflict. */
export async function submitWalk(db: Knex, actor: WalkActor, id: string): Promise<Walk> {
  for (let attempt = 0; attempt < 2; attempt++) {
    const walk = await changeable(db, actor, id);
    if (walk.status === 'submitted') break;
    if (walk.status !== 'draft') throw new HttpError('conflict', `This walk is already ${walk.status}.`);
    if (await walks.changeWalkStatus(db, actor.organisationId, id, 'draft', { status: 'submitted', submittedAt: nowIso() })) break;
  }
  return stored(db, actor, id);
}

/**
 * submitted → approved or rejected by a clerk or admin (the route's guard). Repeating the same
 * decision answers the walk unchanged; any other step is a conflict.
 */
export async function reviewWalk(db: Knex, actor: WalkActor, id: string, decision: { approve: true } | { approve: false; reason: string }): Promise<Walk> {
  const target: WalkStatus = decision.approve ? 'approved' : 'rejected';
  for (let attempt = 0; attempt < 2; attempt++) {
    const walk = await readable(db, actor, id);
    // Nobody approves or rejects their own walk, unless an admin waived that for this walk.
    if (walk.samplerId === actor.id && !walk.ownReviewWaived) throw new HttpError('own_walk');
    if (walk.status === target) break;
    if (walk.status !== 'submitted') throw new HttpError('conflict', `Only a submitted walk can be ${target}; this one is ${walk.status}.`);
    const changed = await walks.changeWalkStatus(db, actor.organisationId, id, 'submitted', {
      status: target,
      reviewedBy: actor.id,
      reviewedAt: nowIso(),
      rejectReason: decision.approve ? null : decision.reason,
    });
    if (changed) break;
  }
  return stored(db, actor, id);
}

/**
 * An admin lets the person who walked a field review that one walk themselves (an organisation
 * with a single office person), with a reason kept on the walk and in the register's provenance.
 * Only a submitted walk; waiving again answers the walk unchanged.
 */
export async function waiveOwnReview(db: Knex, actor: WalkActor, id: string, reason: string): Promise<Walk> {
  const walk = await readable(db, actor, id);
  if (walk.ownReviewWaived) return stored(db, actor, id);
  if (walk.status !== 'submitted') throw new HttpError('conflict', `Only a walk waiting for review can be waived; this one is ${walk.status}.`);
  if (!(await walks.recordOwnReviewWaiver(db, actor.organisationId, id, { by: actor.id, at: nowIso(), reason }))) {
    const now = await walks.findWalkRecord(db, actor.organisationId, id);
    if (!now?.ownReviewWaived) throw new HttpError('conflict', `Only a walk waiting for review can be waived; this one is ${now?.status}.`);
  }
  return stored(db, actor, id);
}

// Photos --------------------------------------------------------------------------------------

/** A photo may be added while the walk is a draft or submitted, by its author, a clerk or an admin. */
export async function checkPhotoUpload(db: Knex, actor: WalkActor, walkId: string): Promise<walks.WalkRecord> {
  const walk = await changeable(db, actor, walkId);
  if (walk.status !== 'draft' && walk.status !== 'submitted') throw new HttpError('conflict', `Photos cannot be added to a walk that is ${walk.status}.`);
  return walk;
}

/**
 * Keeps the photo of one stop in the file store under photos/<organisation>/<walk>/, by a new
 * random name. One photo per stop: a second upload for the stop replaces the first (row and
 * file), so a retried upload never duplicates. The file is stored before its row is written and
 * removed if the row is not, so the row and the file exist together or not at all; only a crash
 * between the two leaves a file without a row (its name is random and never served).
 */
export async function savePhoto(
  db: Knex,
  files: ObjectStore,
  actor: WalkActor,
  walkId: string,
  stop: number,
  data: Buffer,
): Promise<Walk['photos'][number]> {
  const walk = await checkPhotoUpload(db, actor, walkId);
  if (!(await walks.walkHasStop(db, actor.organisationId, walk.id, stop))) throw invalid('stop', 'This walk has no plant at that stop.');
  const type = sniffImageType(data);
  if (!type) throw new HttpError('unsupported_type', 'Send the photo as a JPEG, PNG, WebP or HEIC image.');

  const key = path.posix.join('photos', actor.organisationId, walk.id, `${stop}-${randomBytes(8).toString('hex')}.${type.ext}`);
  await files.put(key, data, { what: 'the photo', contentType: type.contentType });

  const photo: walks.WalkPhotoRecord = { id: randomUUID(), walkId: walk.id, stop, path: key, contentType: type.contentType, size: data.length };
  let replaced: walks.WalkPhotoRecord | undefined;
  try {
    await inTransaction(db, async (trx) => {
      replaced = await walks.photoAtStop(trx, actor.organisationId, walk.id, stop);
      if (replaced) await walks.deletePhoto(trx, actor.organisationId, replaced.id);
      await walks.insertPhoto(trx, actor.organisationId, photo);
    });
  } catch (err) {
    await files.delete(key).catch(() => undefined);
    if (isUniqueViolation(err)) throw new HttpError('conflict', 'Another photo for this stop arrived at the same moment. Try again.');
    throw err;
  }
  if (replaced) await files.delete(replaced.path).catch(() => undefined);
  return { id: photo.id, stop, url: walks.photoUrl(walk.id, photo.id), contentType: photo.contentType, size: photo.size };
}

/** The stored photo, for someone who may read its walk; 404 otherwise (and when its file is gone). */
export async function photoFile(
  db: Knex,
  files: ObjectStore,
  actor: WalkActor,
  walkId: string,
  photoId: string,
): Promise<StoredObject & { contentType: string }> {
  await readable(db, actor, walkId);
  const photo = await walks.getPhoto(db, actor.organisationId, walkId, photoId);
  if (!photo) throw new HttpError('not_found');
  const file = await files.get(photo.path, 'the photo');
  if (!file) throw new HttpError('not_found');
  return { ...file, contentType: photo.contentType };
}

// Assignments ---------------------------------------------------------------------------------

export async function assignWalk(db: Knex, actor: WalkActor, plantingId: string, input: { samplerId: string; dueOn?: string | null }) {
  const planting = await getPlanting(db, actor.organisationId, plantingId);
  if (!planting) throw new HttpError('not_found');
  const sampler = await getUser(db, actor.organisationId, input.samplerId);
  if (!sampler || !allows(sampler.role, 'walks.assignee') || !sampler.active) throw invalid('samplerId', 'Choose an active sampler of your organisation.');
  await walks.upsertWalkAssignment(db, actor.organisationId, { plantingId, samplerId: sampler.id, dueOn: input.dueOn ?? null, createdBy: actor.id });
  return (await walks.getWalkAssignment(db, actor.organisationId, plantingId, sampler.id))!;
}

export async function unassignWalk(db: Knex, actor: WalkActor, plantingId: string, samplerId: string): Promise<void> {
  const planting = await getPlanting(db, actor.organisationId, plantingId);
  if (!planting || !(await walks.deleteWalkAssignment(db, actor.organisationId, plantingId, samplerId))) throw new HttpError('not_found');
}

// Today ---------------------------------------------------------------------------------------

/**
 * The plantings due for a walk this season (not terminated before today): those assigned to the
 * user first, then the rest of the organisation's, each by ranch and field name.
 */
export async function todayList(db: Knex, actor: WalkActor, opts: { q?: string; today?: string } = {}): Promise<{ items: TodayItem[]; total: number }> {
  const today = opts.today ?? todayIso();
  const due = await walks.duePlantings(db, actor.organisationId, { season: seasonOfDate(today), today, q: opts.q });
  const assigned = await walks.assignmentsOfSampler(db, actor.organisationId, actor.id);
  const latest = await walks.latestWalksOf(db, actor.organisationId, due.map((p) => p.plantingId));
  const calibrations = new Map<string, Promise<string | null>>();
  const calibrationOf = (crop: string, variety: string | null) => {
    const key = `${crop}\u0000${(variety ?? '').trim().toLowerCase()}`;
    if (!calibrations.has(key)) calibrations.set(key, assignedCalibrationFor(db, actor.organisationId, crop, variety).then((c) => c?.id ?? null));
    return calibrations.get(key)!;
  };
  const items: TodayItem[] = [];
  for (const p of due) {
    items.push({
      ...p,
      daysSinceSeeding: Math.max(0, daysBetween(p.seededOn, today)),
      assigned: assigned.has(p.plantingId),
      calibrationId: await calibrationOf(p.crop, p.variety),
      latestWalk: latest.get(p.plantingId) ?? null,
    });
  }
  // Array.prototype.sort is stable: ranch and field order holds within each group.
  items.sort((a, b) => Number(b.assigned) - Number(a.assigned));
  return { items, total: items.length };
}
// Single-query reads and writes the routes and pages use as they are (SQL stays in the db modules).
export { listWalks } from './db';
