import fs from 'node:fs';
import http from 'node:http';
import net from 'node:net';
import os from 'node:os';
import path from 'node:path';
import express from 'express';
import request from 'supertest';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { createApp } from '../../../server/app';
import { shutDown, type Lifecycle } from '../../../server/platform/health';
import { createTestApp, settled, TEST_SESSION_SECRET, type TestApp } from '../../helpers/app';
import { startServer } from '../../helpers/server';

let t: TestApp;
let uploads: string;
beforeEach(async () => {
  uploads = fs.mkdtempSync(path.join(os.tmpdir(), 'crowntip-health-'));
  t = await createTestApp({ UPLOADS_DIR: uploads });
});
afterEach(async () => {
  await t.close();
  fs.rmSync(uploads, { recursive: true, force: true });
});

describe('health checks', () => {
  it('answers /healthz and /readyz with 200 when the database and the uploads folder answer', async () => {
    const health = await request(t.app).get('/healthz');
    expect(health.status).toBe(200);
    expect(health.body).toEqual({ ok: true });
    const ready = await request(t.app).get('/readyz');
    expect(ready.status).toBe(200);
    expect(ready.body).toEqual({ ok: true, checks: { database: 'ok', storage: 'ok' } });
    // Neither makes a session row: a load balancer polls them every few seconds.
    expect(ready.headers['set-cookie']).toBeUndefined();
  });

  it('keeps /healthz at 200 without a database, while /readyz says 503 and why', async () => {
    await settled(t.db);
    await t.db.destroy(); // the pool is gone: every query now fails
    const health = await request(t.app).get('/healthz');
    expect(health.status).toBe(200);
    const ready = await request(t.app).get('/readyz');
    expect(ready.status).toBe(503);
    expect(ready.body.ok).toBe(false);
    expect(ready.body.checks.database).not.toBe('ok');
    expect(ready.body.checks.storage).toBe('ok');
  });

  it('answers /readyz with 503 when the uploads folder is missing', async () => {
    fs.rmSync(uploads, { recursive: true, force: true });
    const ready = await request(t.app).get('/readyz');
    expect(ready.status).toBe(503);
    expect(ready.body.checks).toMatchObject({ database: 'ok' });
    expect(ready.body.checks.storage).not.toBe('ok');
  });

  it('answers /readyz with 503 once the server is shutting down', async () => {
    const lifecycle: Lifecycle = { draining: false };
    const app = createApp({ config: t.config, db: t.db, lifecycle, sessionSecret: TEST_SESSION_SECRET });
    expect((await request(app).get('/readyz')).status).toBe(200);
    lifecycle.draining = true;
    const ready = await request(app).get('/readyz');
    expect(ready.status).toBe(503);
    expect(ready.body.checks.server).toBe('shutting down');
  });
});

/** An HTTP server whose /slow answers after `ms`, and a request to it already in flight. */
async function serverWithSlowRoute(ms: number, events: string[] = []) {
  const app = express();
  app.get('/slow', (_req, res) => {
    res.on('finish', () => events.push('answered'));
    setTimeout(() => res.send('finished'), ms);
  });
  const server = http.createServer(app);
  await new Promise<void>((r) => server.listen(0, '127.0.0.1', r));
  const { port } = server.address() as net.AddressInfo;
  const get = (p: string) =>
    new Promise<{ status: number; body: string }>((resolve, reject) => {
      http
        .get({ host: '127.0.0.1', port, path: p, agent: new http.Agent({ keepAlive: true }) }, (res) => {
          let body = '';
          res.on('data', (d) => (body += d));
          res.on('end', () => resolve({ status: res.statusCode!, body }));
        })
        .on('error', reject);
    });
  return { server, get };
}

describe('shutting down', () => {
  it('finishes a request in flight, refuses new connections, then releases the database', async () => {
    const events: string[] = [];
    const { server, get } = await serverWithSlowRoute(400, events);
    const inFlight = get('/slow');
    await new Promise((r) => setTimeout(r, 100)); // the request has reached the handler
    const lifecycle: Lifecycle = { draining: false };
    const done = shutDown(server, { lifecycle, graceMs: 5000, release: async () => void events.push('released') });
    expect(lifecycle.draining).toBe(true);
    await expect(get('/slow')).rejects.toThrow(/ECONNREFUSED|ECONNRESET|socket hang up/);
    const answer = await inFlight;
    expect(answer).toEqual({ status: 200, body: 'finished' });
    expect(await done).toBe('drained');
    expect(events).toEqual(['answered', 'released']);
  });

  it('cuts off a request still running when the grace time is over', async () => {
    const { server, get } = await serverWithSlowRoute(5000);
    const inFlight = get('/slow');
    await new Promise((r) => setTimeout(r, 100));
    const started = Date.now();
    const outcome = await shutDown(server, { lifecycle: { draining: false }, graceMs: 300, release: async () => {} });
    expect(outcome).toBe('cut');
    expect(Date.now() - started).toBeLessThan(2000);
    await expect(inFlight).rejects.toThrow(/socket hang up|ECONNRESET/);
  });

  it('on SIGTERM the real server answers the request it was reading, then exits with 0', { timeout: 90_000 }, async () => {
    const srv = await startServer();
    try {
      const { port } = new URL(srv.url);
      expect((await fetch(`${srv.url}/readyz`)).status).toBe(200);
      // A sign-in whose body arrives in two parts, with SIGTERM between them.
      const body = JSON.stringify({ email: 'nobody@crowntip.test', password: 'not-the-password' });
      const socket = net.connect(Number(port), '127.0.0.1');
      let reply = '';
      socket.on('data', (d) => (reply += d));
      const closed = new Promise((r) => socket.on('close', r));
      await new Promise((r) => socket.once('connect', r));
      socket.write(
        `POST /api/session HTTP/1.1\r\nHost: 127.0.0.1:${port}\r\nContent-Type: application/json\r\nContent-Length: ${Buffer.byteLength(body)}\r\n\r\n${body.slice(0, 10)}`,
      );
      await new Promise((r) => setTimeout(r, 300));
      const exit = srv.signal('SIGTERM');
      await new Promise((r) => setTimeout(r, 300));
      // Still running: the request in flight holds it open, and no new connection is accepted.
      await expect(fetch(`${srv.url}/healthz`)).rejects.toThrow();
      socket.write(body.slice(10));
      await closed;
      expect(reply).toMatch(/^HTTP\/1\.1 401 /); // the sign-in was answered (wrong password), not cut off
      expect(await exit).toBe(0);
      expect(srv.output()).toContain('Crowntip stopped: every request finished.');
    } finally {
      await srv.stop();
    }
  });
});
