import { randomUUID } from 'node:crypto';
import type { Knex } from 'knex';
import type { Logger } from 'pino';
import * as jobsDb from './jobs-db';
import type { JobRow, JobState } from './jobs-db';

// The job interface and what its two engines share; server/platform/jobs.ts explains the design.

export type { JobRow, JobState } from './jobs-db';

export interface JobContext<P = unknown, G = unknown> {
  id: string;
  payload: P;
  organisationId: string | null;
  /** 1 on the first attempt, 2 on the first retry… */
  attempt: number;
  /** Saves the progress for every server to read (a handler calls it every few hundred rows). */
  progress(progress: G): Promise<void>;
  /** Stores a file of the job's result (kept as long as the job is). */
  output(name: string, contentType: string, data: Buffer): Promise<void>;
}

export type JobHandler<P = unknown, G = unknown, R = unknown> = (job: JobContext<P, G>) => Promise<R>;

export interface WorkerOptions {
  /** Further attempts after a failed one. */
  retries?: number;
  retryDelaySeconds?: number;
  /** Longest run of one attempt; past it, on PostgreSQL, the job is handed to another server. */
  timeoutSeconds?: number;
  /** How long finished jobs (and their files) stay readable. */
  keepFinishedMs?: number;
}

export interface EnqueueOptions {
  organisationId?: string | null;
  createdBy?: string | null;
  /** What the job is about (an import's upload id): `latest(kind, subject)` finds its newest job. */
  subject?: string | null;
  /**
   * At most one job holds this key. `keyHeld: 'while-active'` (default) lets it go when the job
   * ends; `'forever'` keeps it, so the key (e.g. a day's reminder) is done once across all servers.
   */
  key?: string;
  keyHeld?: 'while-active' | 'forever';
}

export interface JobQueue {
  readonly engine: 'in-process' | 'pg-boss';
  define<P, G, R>(kind: string, handler: JobHandler<P, G, R>, options?: WorkerOptions): void;
  /** Queues the job; `created` is false when another job holds its key (its id is answered). */
  enqueue(kind: string, payload: unknown, options?: EnqueueOptions): Promise<{ id: string; created: boolean }>;
  /** The job, when it belongs to the organisation (null: a job of the whole install). */
  get<P = unknown, G = unknown, R = unknown>(id: string, organisationId: string | null): Promise<JobRow<P, G, R> | undefined>;
  latest<P = unknown, G = unknown, R = unknown>(kind: string, subject: string, organisationId: string): Promise<JobRow<P, G, R> | undefined>;
  output(id: string, organisationId: string, name: string): Promise<{ contentType: string; data: Buffer } | undefined>;
  /** Queued and running jobs of the organisation by kind (the office home shows them). */
  active(organisationId: string): Promise<Record<string, number>>;
  /** Resolves with the job once it has ended, or as it stands after `timeoutMs`. */
  waitFor<P = unknown, G = unknown, R = unknown>(id: string, organisationId: string | null, timeoutMs?: number): Promise<JobRow<P, G, R> | undefined>;
  /** Starts working (PostgreSQL: connects pg-boss; SQLite: takes up jobs left by a stopped process). */
  start(): Promise<void>;
  /** Takes no more jobs; those running finish within `graceMs`, else are handed back to the queue. */
  stop(graceMs?: number): Promise<void>;
}

export const finished = (state: JobState) => state === 'done' || state === 'failed';

export interface Definition {
  kind: string;
  handler: JobHandler<unknown, unknown, unknown>;
  retries: number;
  retryDelaySeconds: number;
  timeoutSeconds: number;
  keepFinishedMs: number;
}

export const defaults = (kind: string, handler: JobHandler<unknown, unknown, unknown>, o: WorkerOptions = {}): Definition => ({
  kind,
  handler,
  retries: o.retries ?? 2,
  retryDelaySeconds: o.retryDelaySeconds ?? 5,
  timeoutSeconds: o.timeoutSeconds ?? 15 * 60,
  keepFinishedMs: o.keepFinishedMs ?? 7 * 86_400_000,
});

/** What both engines do around one attempt: claim the row, run, record the outcome. */
export async function runAttempt(
  db: Knex,
  logger: Logger,
  def: Definition,
  id: string,
  isLastAttempt: (row: JobRow) => boolean,
): Promise<'done' | 'gone' | { retry: boolean; err: unknown }> {
  const row = await jobsDb.claimJob(db, id);
  if (!row) return 'gone'; // finished already, or forgotten
  const ctx: JobContext = {
    id,
    payload: row.payload,
    organisationId: row.organisationId,
    attempt: row.attempts,
    progress: (p) => jobsDb.saveProgress(db, id, row.attempts, p),
    output: (name, type, data) => jobsDb.putOutput(db, id, name, type, data),
  };
  try {
    const result = await def.handler(ctx);
    await jobsDb.finishJob(db, id, row.attempts, { state: 'done', result: result ?? null });
    return 'done';
  } catch (err) {
    const message = err instanceof Error ? err.message : String(err);
    const last = isLastAttempt(row);
    logger.error({ err, job: id, kind: def.kind, attempt: row.attempts, last }, last ? 'job failed' : 'job failed; it will be tried again');
    if (last) await jobsDb.finishJob(db, id, row.attempts, { state: 'failed', error: message });
    else await jobsDb.requeueJob(db, id, row.attempts, message);
    return { retry: !last, err };
  }
}

/** The enqueue and the reads both engines share (`reads` is spread into each engine's queue as it is). */
export function tableQueue(db: Knex, defs: Map<string, Definition>) {
  const pruned = new Map<string, number>();
  async function housekeep(kind: string) {
    const def = defs.get(kind);
    if (!def || Date.now() - (pruned.get(kind) ?? 0) < 60_000) return;
    pruned.set(kind, Date.now());
    await jobsDb.pruneFinished(db, kind, new Date(Date.now() - def.keepFinishedMs).toISOString());
    // A running job whose every attempt outlived its timeout was lost with its server.
    const stale = new Date(Date.now() - (def.retries + 1) * (def.timeoutSeconds + def.retryDelaySeconds + 60) * 1000).toISOString();
    await jobsDb.failStale(db, kind, stale, 'The server working on this job stopped.');
  }

  return {
    async insert(kind: string, payload: unknown, o: EnqueueOptions) {
      await housekeep(kind);
      const def = defs.get(kind);
      return jobsDb.insertJob(db, {
        id: randomUUID(),
        kind,
        organisationId: o.organisationId ?? null,
        subject: o.subject ?? null,
        singletonKey: o.key ?? null,
        keepKey: o.keyHeld === 'forever',
        payload,
        maxAttempts: (def?.retries ?? 0) + 1,
        createdBy: o.createdBy ?? null,
      });
    },
    reads: {
      get: <P, G, R>(id: string, organisationId: string | null) => jobsDb.getJob(db, id, organisationId) as Promise<JobRow<P, G, R> | undefined>,
      latest: <P, G, R>(kind: string, subject: string, organisationId: string) => jobsDb.latestJob(db, kind, subject, organisationId) as Promise<JobRow<P, G, R> | undefined>,
      async output(id: string, organisationId: string, name: string) {
        const job = await jobsDb.getJob(db, id, organisationId);
        return job ? jobsDb.getOutput(db, id, name) : undefined;
      },
      active: (organisationId: string) => jobsDb.activeCounts(db, organisationId),
      async waitFor<P, G, R>(id: string, organisationId: string | null, timeoutMs = 60_000) {
        const until = Date.now() + timeoutMs;
        for (;;) {
          const job = (await jobsDb.getJob(db, id, organisationId)) as JobRow<P, G, R> | undefined;
          if (!job || finished(job.state) || Date.now() > until) return job;
          await new Promise((r) => setTimeout(r, 100));
        }
      },
    },
  };
}

export interface JobQueueOptions {
  logger: Logger;
  /** PostgreSQL only: how often idle workers look for jobs, and how often expired jobs are handed on. */
  pollSeconds?: number;
  maintenanceSeconds?: number;
}
