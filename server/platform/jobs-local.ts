import type { Knex } from 'knex';
import * as jobsDb from './jobs-db';
import { defaults, runAttempt, tableQueue, type Definition, type JobQueue, type JobQueueOptions } from './jobs-core';

/**
 * The in-process engine (SQLite, one server): each kind runs one job at a time in this process,
 * a failed attempt is retried after its delay, and jobs still queued or running when the process
 * stopped are taken up again by start(). With one server there is no other server to hand a job
 * to; a job running when the process is killed is simply run again at the next start.
 */
export function localQueue(db: Knex, opts: JobQueueOptions): JobQueue & { idle(): Promise<void> } {
  const defs = new Map<string, Definition>();
  const table = tableQueue(db, defs);
  const pending = new Map<string, string[]>();
  const running = new Map<string, Promise<void>>();
  const timers = new Set<NodeJS.Timeout>();
  let stopping = false;
  let started: Promise<void> | undefined;

  function push(kind: string, id: string) {
    if (!pending.has(kind)) pending.set(kind, []);
    const list = pending.get(kind)!;
    if (!list.includes(id)) list.push(id);
    pump(kind);
  }

  function pump(kind: string) {
    const def = defs.get(kind);
    const list = pending.get(kind);
    if (stopping || !def || running.has(kind) || !list?.length) return;
    const id = list.shift()!;
    const work = (async () => {
      await new Promise<void>((r) => setImmediate(r)); // answer the request that queued it first
      const outcome = await runAttempt(db, opts.logger, def, id, (row) => row.attempts >= row.maxAttempts).catch((err: unknown) => {
        opts.logger.error({ err, job: id }, 'job could not be recorded');
        return 'gone' as const;
      });
      if (typeof outcome === 'object' && outcome.retry && !stopping) {
        const t = setTimeout(() => {
          timers.delete(t);
          push(kind, id);
        }, def.retryDelaySeconds * 1000);
        timers.add(t);
      }
    })();
    running.set(kind, work);
    void work.finally(() => {
      running.delete(kind);
      pump(kind);
    });
  }

  return {
    engine: 'in-process',
    define(kind, handler, options) {
      defs.set(kind, defaults(kind, handler as Definition['handler'], options));
      pump(kind);
    },
    async enqueue(kind, payload, options = {}) {
      const made = await table.insert(kind, payload, options);
      if (made.created) push(kind, made.id);
      return made;
    },
    ...table.reads,
    start() {
      started ??= (async () => {
        for (const job of await jobsDb.unfinishedJobs(db, [...defs.keys()])) push(job.kind, job.id);
      })();
      return started;
    },
    async stop(graceMs = 10_000) {
      stopping = true;
      for (const t of timers) clearTimeout(t);
      timers.clear();
      // Jobs left queued stay in the table: the next start takes them up.
      await Promise.race([Promise.allSettled(running.values()), new Promise((r) => setTimeout(r, graceMs).unref())]);
    },
    /** Resolves when nothing is queued, running or waiting for a retry here (tests). */
    async idle() {
      while (!stopping && (running.size || timers.size || [...pending].some(([kind, l]) => defs.has(kind) && l.length))) {
        await Promise.allSettled(running.values());
        if (!running.size && timers.size) await new Promise((r) => setTimeout(r, 20));
      }
    },
  };
}
