import type { Knex } from 'knex';
import { isPostgres } from './database';
import type { JobQueue, JobQueueOptions } from './jobs-core';
import { localQueue } from './jobs-local';
import { pgBossQueue } from './jobs-pgboss';

/*
 * Background jobs behind one small interface (README, "Running on several machines"):
 *
 *   jobs.define(kind, handler, options)      each server, at start: it may work on the kind
 *   jobs.enqueue(kind, payload, options)     any server → { id, created }
 *   jobs.get(id, organisationId)             any server: state, progress, result, error
 *   jobs.output(id, organisationId, name)    any server: a file the job stored (a register's PDF)
 *   jobs.waitFor(id, organisationId, ms)     any server: the job once it has ended
 *   jobs.start() / jobs.stop(graceMs)        server/main.ts, at start and on SIGTERM
 *
 * State, progress, results and files live in the database (jobs-db.ts), so whichever server is
 * asked answers the same. What carries the work differs by engine: on SQLite an in-process queue
 * (jobs-local.ts), on PostgreSQL pg-boss (jobs-pgboss.ts), which hands a job lost with a crashed
 * or stopped server to another one.
 */
export type { JobQueue, JobContext, JobHandler, WorkerOptions, EnqueueOptions, JobRow, JobState } from './jobs-core';
export { finished } from './jobs-core';

/** The queue for the database: pg-boss on PostgreSQL, in-process on SQLite. */
export function createJobQueue(db: Knex, opts: JobQueueOptions): JobQueue {
  return isPostgres(db) ? pgBossQueue(db, opts) : localQueue(db, opts);
}
