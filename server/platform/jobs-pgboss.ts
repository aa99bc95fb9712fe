import type { Knex } from 'knex';
import PgBoss from 'pg-boss';
import { defaults, runAttempt, tableQueue, type Definition, type JobQueue, type JobQueueOptions } from './jobs-core';
import { underQueueSetupLock } from './jobs-db';

/**
 * The PostgreSQL engine: pg-boss (its own schema `pgboss` in the same database) carries each job
 * to one worker on any server; the jobs table keeps what every server reads. A failed attempt is
 * retried after its delay; an attempt still active past the kind's timeout (its server crashed)
 * is failed by pg-boss's supervision, run by every server, and so retried elsewhere. On stop, a
 * server takes no more jobs, waits for its running ones up to the grace time, then hands those
 * back to the queue (they are retried by another server).
 */
export function pgBossQueue(db: Knex, opts: JobQueueOptions): JobQueue {
  const defs = new Map<string, Definition>();
  const table = tableQueue(db, defs);
  const workers = new Map<string, string>();
  const conn = db.client.config.connection as { connectionString?: string };
  const boss = new PgBoss({
    connectionString: conn.connectionString,
    max: 3,
    schedule: false,
    supervise: true,
    maintenanceIntervalSeconds: opts.maintenanceSeconds ?? 30,
    monitorStateIntervalSeconds: 60,
  });
  boss.on('error', (err) => opts.logger.error({ err }, 'job queue error'));
  let started: Promise<void> | undefined;
  let stopped = false;

  async function ensureQueue(def: Definition, update = true) {
    const queue = { name: def.kind, retryLimit: def.retries, retryDelay: def.retryDelaySeconds, expireInSeconds: def.timeoutSeconds };
    // Two servers making one queue at once deadlock inside pg-boss: one at a time, under a lock.
    await underQueueSetupLock(db, async () => {
      if (!(await boss.getQueue(def.kind))) await boss.createQueue(def.kind, queue);
      else if (update) await boss.updateQueue(def.kind, queue);
    });
  }

  async function work(def: Definition) {
    await ensureQueue(def);
    const id = await boss.work<{ jobId: string }>(
      def.kind,
      { batchSize: 1, includeMetadata: true, pollingIntervalSeconds: opts.pollSeconds ?? 2 },
      async (jobs) => {
        // One job per call (batchSize 1).
        for (const job of jobs) {
          const outcome = await runAttempt(db, opts.logger, def, job.data.jobId, () => job.retryCount >= job.retryLimit);
          // Thrown back so that pg-boss schedules the retry (or records the failure).
          if (typeof outcome === 'object') throw outcome.err;
        }
      },
    );
    workers.set(def.kind, id);
  }

  function start() {
    started ??= (async () => {
      await boss.start();
      for (const def of defs.values()) await work(def);
    })();
    return started;
  }

  return {
    engine: 'pg-boss',
    define(kind, handler, options) {
      const def = defaults(kind, handler as Definition['handler'], options);
      defs.set(kind, def);
      if (started && !stopped) void started.then(() => work(def)).catch((err) => opts.logger.error({ err, kind }, 'job worker could not start'));
    },
    async enqueue(kind, payload, options = {}) {
      await start();
      const made = await table.insert(kind, payload, options);
      if (!made.created) return made;
      // A kind no worker here handles: its queue is made with the defaults for another server's worker.
      if (!defs.has(kind)) await ensureQueue(defaults(kind, async () => undefined), false);
      await boss.send(kind, { jobId: made.id }, { id: made.id });
      const worker = workers.get(kind);
      if (worker) boss.notifyWorker(worker); // this server is free: start now rather than at the next poll
      return made;
    },
    ...table.reads,
    start,
    async stop(graceMs = 10_000) {
      if (stopped) return;
      stopped = true;
      if (!started) return;
      await started.catch(() => undefined);
      await boss.stop({ graceful: true, wait: true, close: true, timeout: Math.max(1000, graceMs) });
    },
  };
}
