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

export interface QueueJob {
  /** The walk's client-made UUID. */
  id: string;
  /** Only the person who made a walk sends it (the session decides who the walk belongs to). */
  userId: string;
  createdAt: number;
  body: WalkCreate;
  photos: JobPhoto[];
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

export interface QueueSummary {
  waiting: number;
  attention: number;
  signin: number;
  done: number;
}

export function summarise(jobs: readonly QueueJob[]): QueueSummary {
  const s: QueueSummary = { waiting: 0, attention: 0, signin: 0, done: 0 };
  for (const j of jobs) {
    if (j.state === 'done') s.done++;
    else if (j.state === 'attention') s.attention++;
    else if (j.attention === 'signin') s.signin++;
    else s.waiting++;
  }
  return s;
}
