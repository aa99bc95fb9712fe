import type http from 'node:http';
import { Router } from 'express';
import type { Knex } from 'knex';
import { pingDatabase } from './database';
import type { ObjectStore } from './object-store';

/** Shared between the health routes and the shutdown: once draining, the server says it is not ready. */
export interface Lifecycle {
  draining: boolean;
}

export interface HealthDeps {
  db: Knex;
  files: ObjectStore;
  lifecycle: Lifecycle;
  /** Longest wait for one check before it counts as failed. */
  checkTimeoutMs?: number;
}

const within = <T>(p: Promise<T>, ms: number, what: string) =>
  Promise.race([p, new Promise<never>((_, reject) => setTimeout(() => reject(new Error(`${what} did not answer within ${ms} ms`)), ms).unref())]);

/**
 * `GET /healthz`: the process is up (no database call, so a slow database does not get the
 * process restarted). `GET /readyz`: this server can serve requests now (the database answers
 * and the file store can be written: the uploads folder, or the bucket answers), else 503 so that a load balancer sends traffic elsewhere.
 */
export function healthRoutes(deps: HealthDeps): Router {
  const router = Router();
  const timeout = deps.checkTimeoutMs ?? 2000;
  router.get('/healthz', (_req, res) => {
    res.set('Cache-Control', 'no-store').json({ ok: true });
  });
  router.get('/readyz', async (_req, res) => {
    const checks: Record<string, string> = {};
    if (deps.lifecycle.draining) checks.server = 'shutting down';
    await within(pingDatabase(deps.db), timeout, 'the database').then(
      () => (checks.database = 'ok'),
      (err: Error) => (checks.database = err.message || 'unreachable'),
    );
    await within(deps.files.health(), timeout, 'the file store').then(
      () => (checks.storage = 'ok'),
      (err: Error) => (checks.storage = err.message || 'unreachable'),
    );
    const ok = !deps.lifecycle.draining && checks.database === 'ok' && checks.storage === 'ok';
    res.status(ok ? 200 : 503).set('Cache-Control', 'no-store').json({ ok, checks });
  });
  return router;
}

/**
 * Stops the server gently: readiness turns 503, no new connections are accepted, requests in
 * flight finish (for at most `graceMs`, then their connections are cut), idle keep-alive
 * connections are closed, and finally `release` (the database pool, timers) runs.
 */
export async function shutDown(
  server: http.Server,
  { lifecycle, graceMs, release }: { lifecycle: Lifecycle; graceMs: number; release: () => Promise<void> },
): Promise<'drained' | 'cut'> {
  lifecycle.draining = true;
  let outcome: 'drained' | 'cut' = 'drained';
  await new Promise<void>((resolve) => {
    server.close(() => resolve());
    // A keep-alive connection between requests would hold close() open: close those as they idle.
    server.closeIdleConnections();
    const idle = setInterval(() => server.closeIdleConnections(), 100);
    const cut = setTimeout(() => {
      outcome = 'cut';
      server.closeAllConnections();
    }, graceMs);
    server.once('close', () => {
      clearInterval(idle);
      clearTimeout(cut);
    });
  });
  await release();
  return outcome;
}
