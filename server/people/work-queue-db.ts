import type { Knex } from 'knex';
import { addDaysIso } from '../../shared/registry/season';
import { jsonValue } from '../platform/column-values';

/*
 * The office home's work queue: what the office has to do next, each with its count, the oldest
 * item where order matters, and the page that lists it. It reads walks, plantings and registers
 * directly (one small query each) so the home page stays one round of cheap counts.
 */

/** Days ahead in which a planting counts as "due for a walk soon" (README "The office home"). */
export const DUE_SOON_DAYS = 14;

export interface WorkQueue {
  today: string;
  reportingYear: number;
  /** Submitted walks waiting for review; `oldest` is the first one submitted. */
  toReview: { count: number; oldestWalkedOn: string | null };
  /** Not terminated, due within DUE_SOON_DAYS (today included), no submitted or approved walk. */
  dueSoon: { count: number };
  /** Not terminated, due before today, no submitted or approved walk. */
  overdue: { count: number };
  /** Ranches without a finalised register of the reporting year. */
  draftRegisters: { count: number };
  /** Registry imports and organisation register builds queued or running (any server); `latest` is the newest. */
  imports: { count: number; latest: { id: string; uploadId: string } | null };
  registerBuilds: { count: number; latest: { id: string; year: number } | null };
}

// The job kinds as server/registry/import/service.ts and server/registers/jobs.ts name them.
const IMPORT_JOB = 'registry-import';
const BUILD_JOB = 'register-build';

/** Queued and running jobs of one kind: how many, and the newest with its payload. */
async function activeJobs(db: Knex, organisationId: string, kind: string) {
  const active = db('jobs').where({ organisation_id: organisationId, kind }).whereIn('state', ['queued', 'running']);
  const n = await active.clone().count({ n: '*' }).first();
  const newest = await active.clone().orderBy('created_at', 'desc').first('id', 'subject', 'payload');
  const payload = newest ? (jsonValue<{ year?: number }>(newest.payload) ?? {}) : {};
  return { count: Number(n?.n ?? 0), newest: newest ? { id: newest.id as string, subject: newest.subject as string | null, year: payload.year } : null };
}

/** The reporting year whose season contains the date: the winter in progress ends in it. */
const reportingYearOf = (iso: string) => Number(iso.slice(0, 4)) + (Number(iso.slice(5, 7)) >= 7 ? 1 : 0);

/**
 * A planting's due date: the earliest due-by date of its walk assignments, else its planned
 * termination (the last day a walk can still count).
 */
function plantingsDue(db: Knex, organisationId: string) {
  const assignedDue = db('walk_assignments').whereRaw('walk_assignments.planting_id = plantings.id').whereNotNull('due_on').min('due_on');
  return db('plantings')
    .where('plantings.organisation_id', organisationId)
    .whereNull('plantings.terminated_on')
    .whereNotExists(db('field_walks').whereRaw('field_walks.planting_id = plantings.id').whereIn('field_walks.status', ['submitted', 'approved']))
    .select('plantings.id', db.raw('coalesce((?), plantings.planned_termination_on) as due_on', [assignedDue]));
}

export async function workQueue(db: Knex, organisationId: string, today: string): Promise<WorkQueue> {
  const review = await db('field_walks')
    .where({ organisation_id: organisationId, status: 'submitted' })
    .first(db.raw('count(*) as n'), db.raw('min(walked_on) as oldest'));
  const due = db.from(plantingsDue(db, organisationId).as('p')).whereNotNull('due_on');
  const soon = await due.clone().whereBetween('due_on', [today, addDaysIso(today, DUE_SOON_DAYS)]).count({ n: '*' }).first();
  const late = await due.clone().where('due_on', '<', today).count({ n: '*' }).first();
  const year = reportingYearOf(today);
  const drafts = await db('ranches')
    .where('ranches.organisation_id', organisationId)
    .whereNotExists(db('registers').whereRaw('registers.ranch_id = ranches.id').where('registers.year', year))
    .count({ n: '*' })
    .first();
  const imports = await activeJobs(db, organisationId, IMPORT_JOB);
  const builds = await activeJobs(db, organisationId, BUILD_JOB);
  return {
    today,
    reportingYear: year,
    toReview: { count: Number(review?.n ?? 0), oldestWalkedOn: review?.oldest ? String(review.oldest).slice(0, 10) : null },
    dueSoon: { count: Number(soon?.n ?? 0) },
    overdue: { count: Number(late?.n ?? 0) },
    draftRegisters: { count: Number(drafts?.n ?? 0) },
    imports: { count: imports.count, latest: imports.newest?.subject ? { id: imports.newest.id, uploadId: imports.newest.subject } : null },
    registerBuilds: { count: builds.count, latest: builds.newest?.year ? { id: builds.newest.id, year: builds.newest.year } : null },
  };
}
