import type { WalkCreate } from '../../../shared/schemas/walks';
import type { BoundaryProposalCreate } from '../../../shared/schemas/boundary-proposals';
import { freshJob, type AttentionKind, type JobError, type JobPhoto, type JobStep, type QueueJob, type WalkJob } from './jobs';

export * from './jobs';

/**
 * The outbox of finished field walks. A job is one walk: create (POST /api/walks) → each photo
 * (POST /api/walks/:id/photos) → submit (POST /api/walks/:id/submit). Every step is idempotent on
 * the server (client-made id; a re-posted photo replaces the stop's photo; submit twice is submit
 * once), so a job can be retried from its last saved step after a lost answer, a closed tab or a
 * dead battery without ever making a second record.
 *
 * Storage, transport, clock, randomness and timers are injected: the browser uses IndexedDB and the
 * API client (features/offline/outbox.ts); tests use a fake store and a fake network.
 */

export interface QueueStorage {
  all(): Promise<QueueJob[]>;
  put(job: QueueJob): Promise<void>;
  remove(id: string): Promise<void>;
}

export interface QueueTransport {
  createWalk(body: WalkCreate): Promise<unknown>;
  uploadPhoto(walkId: string, photo: JobPhoto): Promise<unknown>;
  submitWalk(walkId: string): Promise<unknown>;
  /** A traced boundary for the office (POST /api/fields/:id/boundary-proposals). */
  proposeBoundary(fieldId: string, body: BoundaryProposalCreate): Promise<unknown>;
  /** After a job is done: drop its photos from the phone (optional). */
  cleanUp?(job: QueueJob): Promise<void>;
}

export interface BackoffOptions {
  baseMs: number;
  maxMs: number;
}

export const DEFAULT_BACKOFF: BackoffOptions = { baseMs: 2_000, maxMs: 5 * 60_000 };
/** Sent walks stay listed (and their stored result readable offline) this long. */
export const KEEP_DONE_MS = 14 * 24 * 3600_000;

export interface QueueDeps {
  storage: QueueStorage;
  transport: QueueTransport;
  now?: () => number;
  random?: () => number;
  setTimer?: (fn: () => void, ms: number) => unknown;
  clearTimer?: (handle: unknown) => void;
  backoff?: BackoffOptions;
}

/**
 * Exponential backoff with "equal jitter": the ceiling doubles per failure from baseMs up to maxMs,
 * and the wait is drawn uniformly from its upper half. So it never waits less than baseMs/2 or more
 * than maxMs, and phones that lost signal together do not all retry in the same second.
 */
export function backoffDelay(attempt: number, random: () => number, opts: BackoffOptions = DEFAULT_BACKOFF): number {
  const ceiling = Math.min(opts.maxMs, opts.baseMs * 2 ** Math.max(0, attempt - 1));
  return Math.round(ceiling / 2 + random() * (ceiling / 2));
}

/** What to do about a failed step. Errors are duck-typed ApiErrors: `{status, code, message}`. */
export function classify(error: unknown, step: JobStep): 'retry' | 'signin' | 'skip_photo' | AttentionKind {
  const status = errorStatus(error);
  if (status === 0 || status === 408 || status === 429 || status >= 500) return 'retry';
  if (status === 401) return 'signin';
  if (status === 409) return 'conflict';
  // A photo the server will not take (too large, wrong type) must not hold back the measurements.
  if (step === 'photos' && (status === 400 || status === 413 || status === 415)) return 'skip_photo';
  return 'refused';
}

function errorStatus(error: unknown): number {
  const s = (error as { status?: unknown } | null)?.status;
  return typeof s === 'number' ? s : 0; // a thrown TypeError from fetch is a network failure
}

function toJobError(error: unknown): JobError {
  const e = error as { status?: unknown; code?: unknown; message?: unknown } | null;
  return {
    status: errorStatus(error),
    code: typeof e?.code === 'string' ? e.code : 'network',
    message: typeof e?.message === 'string' ? e.message : String(error),
  };
}

export function newJob(input: {
  body: WalkCreate;
  userId: string;
  photos: Array<{ stop: number; key: string }>;
  label: QueueJob['label'];
  now: number;
}): WalkJob {
  return {
    ...freshJob({ id: input.body.id, userId: input.userId, label: input.label, now: input.now }),
    body: input.body,
    photos: input.photos.map((p) => ({ ...p, state: 'pending' as const })),
  };
}

export type Queue = ReturnType<typeof createQueue>;

export function createQueue(deps: QueueDeps) {
  const now = deps.now ?? (() => Date.now());
  const random = deps.random ?? Math.random;
  const setTimer = deps.setTimer ?? ((fn: () => void, ms: number) => setTimeout(fn, ms));
  const clearTimer = deps.clearTimer ?? ((h: unknown) => clearTimeout(h as ReturnType<typeof setTimeout>));
  const backoff = deps.backoff ?? DEFAULT_BACKOFF;

  let jobs = new Map<string, QueueJob>();
  let userId: string | null = null;
  let loaded: Promise<void> | null = null;
  let running: Promise<void> | null = null;
  let again = false;
  let timer: unknown = null;
  let sending: string | null = null;
  const listeners = new Set<() => void>();
  let snapshot: QueueJob[] = [];

  function emit() {
    snapshot = [...jobs.values()].sort((a, b) => a.createdAt - b.createdAt);
    for (const l of listeners) l();
  }

  async function save(job: QueueJob) {
    jobs.set(job.id, job);
    await deps.storage.put(job);
    emit();
  }

  function load(): Promise<void> {
    loaded ??= (async () => {
      const stored = await deps.storage.all();
      jobs = new Map(stored.map((j) => [j.id, j]));
      // Old sent walks are forgotten; anything not sent is kept whatever its age.
      for (const j of stored) {
        if (j.state === 'done' && j.doneAt !== null && now() - j.doneAt > KEEP_DONE_MS) {
          jobs.delete(j.id);
          await deps.storage.remove(j.id);
        }
      }
      emit();
    })();
    return loaded;
  }

  function schedule() {
    if (timer !== null) clearTimer(timer);
    timer = null;
    const due = [...jobs.values()].filter((j) => j.state === 'waiting' && j.userId === userId && j.attention !== 'signin');
    if (due.length === 0) return;
    const next = Math.min(...due.map((j) => j.nextAttemptAt));
    timer = setTimer(() => {
      timer = null;
      void run();
    }, Math.max(0, next - now()));
  }

  /** One job from its saved step to done, or to its first failure. Returns false on a network-type failure. */
  async function process(start: QueueJob): Promise<boolean> {
    let job = start;
    sending = job.id;
    emit();
    try {
      while (job.step !== 'done') {
        try {
          if (job.kind === 'boundary') {
            await deps.transport.proposeBoundary(job.fieldId, job.body);
            job = { ...job, step: 'done', state: 'done', attempts: 0, lastError: null, attention: null, doneAt: now() };
            await save(job);
          } else if (job.step === 'create') {
            await deps.transport.createWalk(job.body);
            job = { ...job, step: 'photos', attempts: 0, lastError: null, attention: null };
            await save(job);
          } else if (job.step === 'photos') {
            const photo = job.photos.find((p) => p.state === 'pending');
            if (!photo) {
              job = { ...job, step: 'submit' };
              await save(job);
              continue;
            }
            let state: JobPhoto['state'] = 'sent';
            try {
              await deps.transport.uploadPhoto(job.id, photo);
            } catch (err) {
              if (classify(err, 'photos') !== 'skip_photo') throw err;
              state = 'refused';
            }
            job = { ...job, attempts: 0, lastError: null, photos: job.photos.map((p) => (p === photo ? { ...p, state } : p)) };
            await save(job);
          } else {
            await deps.transport.submitWalk(job.id);
            job = { ...job, step: 'done', state: 'done', attempts: 0, lastError: null, attention: null, doneAt: now() };
            await save(job);
            try {
              await deps.transport.cleanUp?.(job);
            } catch {
              // leftover photos are harmless; the walk is sent
            }
          }
        } catch (err) {
          const verdict = classify(err, job.step);
          const lastError = toJobError(err);
          if (verdict === 'retry' || verdict === 'signin') {
            const attempts = job.attempts + 1;
            job = {
              ...job,
              attempts,
              lastError,
              attention: verdict === 'signin' ? 'signin' : null,
              nextAttemptAt: now() + backoffDelay(attempts, random, backoff),
            };
            await save(job);
            return false;
          }
          // A conflict or a refusal: keep the job and its data, stop retrying, tell the sampler.
          job = { ...job, state: 'attention', attention: verdict === 'skip_photo' ? 'refused' : verdict, lastError };
          await save(job);
          return true;
        }
      }
      return true;
    } finally {
      sending = null;
      emit();
    }
  }

  async function pass() {
    const due = [...jobs.values()]
      .filter((j) => j.state === 'waiting' && j.userId === userId && j.attention !== 'signin' && j.nextAttemptAt <= now())
      .sort((a, b) => a.createdAt - b.createdAt);
    for (const job of due) {
      const reachable = await process(job);
      // No signal for one walk means none for the next: leave them to their own backoff.
      if (!reachable) break;
    }
  }

  /** Sends every job that is due. Calls while a run is going are folded into one more pass. */
  function run(): Promise<void> {
    if (running) {
      again = true;
      return running;
    }
    running = (async () => {
      await load();
      do {
        again = false;
        await pass();
      } while (again);
    })().finally(() => {
      running = null;
      schedule();
    });
    return running;
  }

  /** Signal is back (or the sampler asked, or signed in again): every waiting job is due now. */
  async function retryNow() {
    await load();
    for (const job of jobs.values()) {
      if (job.state === 'waiting' && job.userId === userId) {
        jobs.set(job.id, { ...job, attempts: 0, nextAttemptAt: now(), attention: null });
        await deps.storage.put(jobs.get(job.id)!);
      }
    }
    emit();
    return run();
  }

  return {
    load,
    run,
    retryNow,
    /**
     * Saves the job (so nothing is lost if the tab dies now) and starts sending it in the
     * background; resolves once it is saved, not once it is sent.
     */
    async enqueue(job: QueueJob) {
      await load();
      await save(job);
      void run();
    },
    /** Whose walks may be sent with the current session. */
    setUser(id: string | null) {
      userId = id;
      schedule();
    },
    get(id: string): QueueJob | undefined {
      return jobs.get(id);
    },
    snapshot: () => snapshot,
    sendingId: () => sending,
    subscribe(listener: () => void) {
      listeners.add(listener);
      return () => {
        listeners.delete(listener);
      };
    },
    stop() {
      if (timer !== null) clearTimer(timer);
      timer = null;
    },
  };
}
