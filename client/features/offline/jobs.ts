import type { BoundaryProposalCreate } from '../../../shared/schemas/boundary-proposals';
import type { WalkCreate } from '../../../shared/schemas/walks';

/**
 * The outbox's job records and their summary. Kept apart from the sending engine (queue.ts) so
 * that the first screen can show the outbox's state without loading the engine.
 */

export type JobStep = 'create' | 'photos' | 'submit' | 'done';
export type JobState = 'waiting' | 'attention' | 'done';
/** Why a job waits for a person: a real conflict, a refusal, or a session to sign in again. */
export type AttentionKind = 'conflict' | 'refused' | 'signin';

export interface JobPhoto {
  stop: number;
  /** Key of the compressed image in the photo store. */
  key: string;
  state: 'pending' | 'sent' | 'refused';
}

export interface JobError {
  status: number;
  code: string;
  message: string;
}

export interface JobBase {
  /** The client-made UUID of the walk or traced boundary: the server's key, so a re-send never duplicates. */
  id: string;
  /** Only the person who made a walk sends it (the session decides who the walk belongs to). */
  userId: string;
  createdAt: number;
  /** For the list on the phone. */
  label: { fieldName: string; ranchName: string };
  step: JobStep;
  state: JobState;
  /** Failures in a row since the last success or the last "signal is back". */
  attempts: number;
  nextAttemptAt: number;
  attention: AttentionKind | null;
  lastError: JobError | null;
  doneAt: number | null;
}

/** A field walk: create → photos → submit. Jobs stored before boundaries were traced have no `kind`. */
export interface WalkJob extends JobBase {
  kind?: 'walk';
  body: WalkCreate;
  photos: JobPhoto[];
}

/** A boundary traced on the phone, proposed for its field in one step. */
export interface BoundaryJob extends JobBase {
  kind: 'boundary';
  fieldId: string;
  body: BoundaryProposalCreate;
  /** Always empty: a traced boundary has no photos. */
  photos: JobPhoto[];
}

export type QueueJob = WalkJob | BoundaryJob;
export const isWalkJob = (j: QueueJob): j is WalkJob => j.kind !== 'boundary';

export interface QueueSummary {
  waiting: number;
  attention: number;
  signin: number;
  done: number;
}

/** Where a job stands for the sampler: waiting its turn, waiting for a person, waiting for a sign-in, or sent. */
export function bucketOf(j: QueueJob): keyof QueueSummary {
  if (j.state === 'done') return 'done';
  if (j.state === 'attention') return 'attention';
  return j.attention === 'signin' ? 'signin' : 'waiting';
}

export function summarise(jobs: readonly QueueJob[]): QueueSummary {
  const s: QueueSummary = { waiting: 0, attention: 0, signin: 0, done: 0 };
  for (const j of jobs) s[bucketOf(j)]++;
  return s;
}

/**
 * Whether a job did not go at once, so that its arrival is worth saying: it failed to go, it waits
 * for a sign-in, or it is kept while the phone has no signal (a job queued behind one that failed
 * is never tried, so it has no error of its own).
 */
export function hadToWait(j: QueueJob, online: boolean): boolean {
  return j.state !== 'done' && (j.lastError !== null || j.attention === 'signin' || !online);
}

/** What every new job starts as, walk or boundary: at its first step, nothing tried yet, due now. */
export function freshJob(input: { id: string; userId: string; label: QueueJob['label']; now: number }): JobBase {
  return {
    id: input.id,
    userId: input.userId,
    createdAt: input.now,
    label: input.label,
    step: 'create',
    state: 'waiting',
    attempts: 0,
    nextAttemptAt: input.now,
    attention: null,
    lastError: null,
    doneAt: null,
  };
}

/** A traced boundary's job: one step, the proposal, idempotent on its client-made id. */
export function newBoundaryJob(input: { fieldId: string; body: BoundaryProposalCreate; userId: string; label: QueueJob['label']; now: number }): BoundaryJob {
  return { ...freshJob({ id: input.body.id, userId: input.userId, label: input.label, now: input.now }), kind: 'boundary', fieldId: input.fieldId, body: input.body, photos: [] };
}
