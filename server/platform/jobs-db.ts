import type { Knex } from 'knex';
import { jsonValue } from './column-values';

/*
 * The jobs table: one row per background job with its state, progress, result and files, read
 * the same way by every app server whichever engine carries the work (server/platform/jobs.ts).
 */

export type JobState = 'queued' | 'running' | 'done' | 'failed';

export interface JobRow<P = unknown, G = unknown, R = unknown> {
  id: string;
  kind: string;
  organisationId: string | null;
  subject: string | null;
  state: JobState;
  payload: P;
  progress: G | null;
  result: R | null;
  error: string | null;
  attempts: number;
  maxAttempts: number;
  createdBy: string | null;
  createdAt: string;
  startedAt: string | null;
  finishedAt: string | null;
}

interface RawRow {
  id: string;
  kind: string;
  organisation_id: string | null;
  subject: string | null;
  state: JobState;
  payload: string;
  progress: string | null;
  result: string | null;
  error: string | null;
  attempts: number;
  max_attempts: number;
  created_by: string | null;
  created_at: string;
  started_at: string | null;
  finished_at: string | null;
}

const fromRow = (r: RawRow): JobRow => ({
  id: r.id,
  kind: r.kind,
  organisationId: r.organisation_id,
  subject: r.subject,
  state: r.state,
  payload: jsonValue(r.payload),
  progress: jsonValue(r.progress),
  result: jsonValue(r.result),
  error: r.error,
  attempts: Number(r.attempts),
  maxAttempts: Number(r.max_attempts),
  createdBy: r.created_by,
  createdAt: r.created_at,
  startedAt: r.started_at,
  finishedAt: r.finished_at,
});

const nowIso = () => new Date().toISOString();
const UNFINISHED: JobState[] = ['queued', 'running'];

export interface NewJob {
  id: string;
  kind: string;
  organisationId: string | null;
  subject: string | null;
  singletonKey: string | null;
  /** Keep the singleton key once the job has ended (done once, for ever). */
  keepKey: boolean;
  payload: unknown;
  maxAttempts: number;
  createdBy: string | null;
}

/**
 * Inserts the job; when another job already holds its singleton key, inserts nothing and answers
 * that job's id (the unique index decides, so two servers enqueueing at once get one job).
 */
export async function insertJob(db: Knex, job: NewJob): Promise<{ id: string; created: boolean }> {
  await db('jobs')
    .insert({
      id: job.id,
      kind: job.kind,
      organisation_id: job.organisationId,
      subject: job.subject,
      singleton_key: job.singletonKey,
      keep_key: job.keepKey,
      state: 'queued',
      payload: JSON.stringify(job.payload ?? null),
      max_attempts: job.maxAttempts,
      created_by: job.createdBy,
      created_at: nowIso(),
    })
    .onConflict('singleton_key')
    .ignore();
  if (!job.singletonKey) return { id: job.id, created: true };
  const holder = await db('jobs').where({ singleton_key: job.singletonKey }).first('id');
  return holder ? { id: holder.id, created: holder.id === job.id } : { id: job.id, created: false };
}

/** The job; with an organisation id, only when it belongs to that organisation. */
export async function getJob(db: Knex, id: string, organisationId?: string | null): Promise<JobRow | undefined> {
  const q = db('jobs').where({ id });
  if (organisationId !== undefined) q.where({ organisation_id: organisationId });
  const row = await q.first();
  return row ? fromRow(row) : undefined;
}

/** The newest job of a kind about a subject (an import's upload). */
export async function latestJob(db: Knex, kind: string, subject: string, organisationId: string): Promise<JobRow | undefined> {
  const row = await db('jobs').where({ kind, subject, organisation_id: organisationId }).orderBy('created_at', 'desc').first();
  return row ? fromRow(row) : undefined;
}

/**
 * Marks the job running and counts the attempt; undefined when it is finished or gone. A
 * "running" row is claimed again on purpose: its server stopped, and the queue handed it on.
 */
export async function claimJob(db: Knex, id: string): Promise<JobRow | undefined> {
  const n = await db('jobs')
    .where({ id })
    .whereIn('state', UNFINISHED)
    .update({ state: 'running', attempts: db.raw('attempts + 1'), started_at: nowIso(), progress: null, finished_at: null });
  return n ? getJob(db, id) : undefined;
}

// Writes below name the attempt: one handed to another server while still running here (a slow
// shutdown) cannot overwrite what the newer attempt records.
export async function saveProgress(db: Knex, id: string, attempt: number, progress: unknown): Promise<void> {
  await db('jobs').where({ id, attempts: attempt, state: 'running' }).update({ progress: JSON.stringify(progress) });
}

/** Ends the job; its singleton key is let go unless it was taken for ever and the job is done. */
export async function finishJob(db: Knex, id: string, attempt: number, end: { state: 'done' | 'failed'; result?: unknown; error?: string | null }) {
  const update = {
    state: end.state,
    result: end.result === undefined ? null : JSON.stringify(end.result),
    error: end.error ?? null,
    finished_at: nowIso(),
  };
  if (!(await db('jobs').where({ id, attempts: attempt, state: 'running' }).update(update))) return;
  const release = db('jobs').where({ id }).whereNotNull('singleton_key');
  await (end.state === 'done' ? release.where({ keep_key: false }) : release).update({ singleton_key: null });
}

/** Back in the queue after a failed attempt, with what went wrong. */
export async function requeueJob(db: Knex, id: string, attempt: number, error: string): Promise<void> {
  await db('jobs').where({ id, attempts: attempt, state: 'running' }).update({ state: 'queued', error });
}

/** Queued or running jobs of the kinds (a restarted in-process queue takes them up again). */
export async function unfinishedJobs(db: Knex, kinds: string[]): Promise<{ id: string; kind: string }[]> {
  if (!kinds.length) return [];
  return db('jobs').whereIn('kind', kinds).whereIn('state', UNFINISHED).orderBy('created_at').select('id', 'kind');
}

/** Queued and running jobs of the organisation, counted by kind. */
export async function activeCounts(db: Knex, organisationId: string): Promise<Record<string, number>> {
  const rows: { kind: string; n: number | string }[] = await db('jobs')
    .where({ organisation_id: organisationId })
    .whereIn('state', UNFINISHED)
    .groupBy('kind')
    .select('kind', db.raw('count(*) as n'));
  return Object.fromEntries(rows.map((r) => [r.kind, Number(r.n)]));
}

/** Forgets finished jobs of a kind (and their files) that ended before `before`. */
export async function pruneFinished(db: Knex, kind: string, before: string): Promise<void> {
  const old = db('jobs').where({ kind }).whereNotIn('state', UNFINISHED).where('finished_at', '<', before).select('id');
  await db('job_outputs').whereIn('job_id', old.clone()).delete();
  await db('jobs').whereIn('id', old).delete();
}

/** Running jobs of a kind started before `before`: their server stopped and no retry is left. */
export async function failStale(db: Knex, kind: string, before: string, error: string): Promise<number> {
  return db('jobs').where({ kind, state: 'running' }).where('started_at', '<', before).update({ state: 'failed', error, finished_at: nowIso(), singleton_key: null });
}

export async function putOutput(db: Knex, jobId: string, name: string, contentType: string, data: Buffer): Promise<void> {
  await db('job_outputs').insert({ job_id: jobId, name, content_type: contentType, data }).onConflict(['job_id', 'name']).merge();
}

export async function getOutput(db: Knex, jobId: string, name: string): Promise<{ contentType: string; data: Buffer } | undefined> {
  const row = await db('job_outputs').where({ job_id: jobId, name }).first('content_type', 'data');
  return row ? { contentType: row.content_type, data: Buffer.from(row.data) } : undefined;
}

/**
 * Runs `work` while this server holds PostgreSQL's lock on setting up job queues (one transaction-
 * scoped advisory lock), so that two servers never set up queues at the same moment.
 */
export async function underQueueSetupLock(db: Knex, work: () => Promise<void>): Promise<void> {
  await db.transaction(async (trx) => {
    await trx.raw('select pg_advisory_xact_lock(hashtext(?))', ['crowntip job queues']);
    await work();
  });
}
