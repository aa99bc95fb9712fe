import { randomUUID } from 'node:crypto';
import http from 'node:http';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import type { Knex } from 'knex';
import { openDatabase } from '../../server/platform/database';
import { addDaysIso, todayIso } from '../../shared/registry/season';
import { DEMO_PASSWORD, TEST_SESSION_SECRET, TEST_SIGNING_KEY } from '../helpers/app';
import { startFakeS3, type FakeS3 } from '../helpers/fake-s3';
import { createThrowawayDatabase, dropDatabase } from '../helpers/postgres';
import { startServer, type RunningServer } from '../helpers/server';
import { at } from '../helpers/lists';

/*
 * The proof that Crowntip runs on several machines: two real server processes (server/main.ts,
 * as `npm start` runs it) on one PostgreSQL database and one S3-compatible store (s3rver, started
 * here), and a client that goes to one and then the other, as behind a load balancer without
 * sticky sessions. Last, one server is killed (SIGKILL) while 50 clients submit walks to both.
 */

/** A real 1 × 1 PNG. */
const TINY_PNG = Buffer.from('iVBORw0KGgoAAAANSUhEUgAAAAEAAAABCAIAAACQd1PeAAAADElEQVR4nGPwqtEDAAIIAPXOsRDEAAAAAElFTkSuQmCC', 'base64');

let s3: FakeS3;
let database: { name: string; url: string };
let db: Knex;
let a: RunningServer;
let b: RunningServer;
let startedAt = 0;

beforeAll(async () => {
  const pg = inject('postgres')!;
  s3 = await startFakeS3();
  database = await createThrowawayDatabase(pg.adminUrl, pg.prefix, pg.seededTemplate);
  db = openDatabase(database.url, { poolMax: 4 });
  // One assigned planting due for termination soon, so that the daily reminder has something to send.
  const assigned = await db('walk_assignments').orderBy('planting_id').first('planting_id');
  await db('plantings').where('id', assigned.planting_id).update({ planned_termination_on: addDaysIso(todayIso(), 5), terminated_on: null });
  const env = {
    DATABASE_URL: database.url,
    ...s3.env,
    SESSION_SECRET: TEST_SESSION_SECRET,
    REGISTER_SIGNING_KEY: TEST_SIGNING_KEY,
    SEED_DEMO: 'false',
    // Both run the daily job, as two servers started alike would; the first check is a minute after start.
    DAILY_JOBS: 'true',
    LOG_LEVEL: 'info',
  };
  startedAt = Date.now();
  [a, b] = await Promise.all([startServer(env), startServer(env)]);
}, 180_000);

afterAll(async () => {
  await Promise.all([a?.stop(), b?.stop()]);
  await db?.destroy();
  if (database) await dropDatabase(inject('postgres')!.adminUrl, database.name);
  await s3?.remove();
}, 60_000);

/**
 * One request on a connection of its own (node:http, no keep-alive), answered as a fetch Response:
 * a pooled connection the server closes while idle would fail the next request with ECONNRESET,
 * which the walk clients below must be able to read as "the server died".
 */
async function send(url: string, init: { method?: string; headers?: Record<string, string>; body?: Buffer } = {}): Promise<Response> {
  return new Promise((resolve, reject) => {
    const req = http.request(url, { method: init.method ?? 'GET', headers: init.headers, agent: false, timeout: 20_000 }, (res) => {
      const chunks: Buffer[] = [];
      res.on('data', (c: Buffer) => chunks.push(c));
      res.on('error', reject);
      res.on('end', () => {
        const headers = new Headers();
        for (const [k, v] of Object.entries(res.headers)) for (const one of Array.isArray(v) ? v : [v ?? '']) headers.append(k, one);
        const status = res.statusCode ?? 0;
        resolve(new Response(status === 204 || status === 304 ? null : Buffer.concat(chunks), { status, headers }));
      });
    });
    req.on('timeout', () => req.destroy(new Error(`${url}: no answer within 20 s`)));
    req.on('error', reject);
    req.end(init.body);
  });
}

/** A browser-like client: one cookie jar and the CSRF token, whichever server it talks to. */
class Client {
  cookie = '';
  csrf = '';
  async send(server: RunningServer, method: string, path: string, body?: unknown): Promise<Response> {
    const headers: Record<string, string> = { accept: 'application/json' };
    if (this.cookie) headers.cookie = this.cookie;
    if (method !== 'GET') headers['x-csrf-token'] = this.csrf;
    let payload: Buffer | undefined;
    if (body instanceof FormData) {
      const encoded = new Response(body); // multipart with its boundary
      headers['content-type'] = encoded.headers.get('content-type')!;
      payload = Buffer.from(await encoded.arrayBuffer());
    } else if (body !== undefined) {
      headers['content-type'] = 'application/json';
      payload = Buffer.from(JSON.stringify(body));
    }
    const res = await send(`${server.url}${path}`, { method, headers, body: payload });
    const set = res.headers.getSetCookie().map((c) => c.split(';')[0]);
    if (set.length) this.cookie = set.join('; ');
    return res;
  }
  async signIn(server: RunningServer, email: string, password = DEMO_PASSWORD): Promise<Response> {
    const res = await this.send(server, 'POST', '/api/session', { email, password });
    if (res.ok) this.csrf = ((await (await this.send(server, 'GET', '/api/session')).json()) as { csrfToken: string }).csrfToken;
    return res;
  }
}

async function duePlanting(sampler: Client, server: RunningServer): Promise<string> {
  const today = (await (await sampler.send(server, 'GET', '/api/today')).json()) as { items: { plantingId: string }[] };
  return at(today.items, 0, 'planting due today').plantingId;
}

const walkBody = (id: string, plantingId: string) => ({
  id,
  plantingId,
  walkedOn: todayIso(),
  stage: 'Z31',
  plants: [1, 2, 3].map((stop) => ({ stop, lengthCm: 80 + stop })),
});

describe('two servers, one database, one file store', () => {
  it('both say they are ready, with the database and the file store', async () => {
    for (const server of [a, b]) {
      const ready = await send(`${server.url}/readyz`);
      expect(await ready.json()).toEqual({ ok: true, checks: { database: 'ok', storage: 'ok' } });
      expect(server.output()).toContain(`Files: S3-compatible store, ${s3.endpoint}/${s3.bucket}/`);
    }
  });

  it('signs in on A and writes on B with the CSRF token A gave', async () => {
    const clerk = new Client();
    expect((await clerk.signIn(a, 'clerk@crowntip.test')).status).toBe(200);
    const made = await clerk.send(b, 'POST', '/api/ranches', { name: 'Ranch Written On B' });
    expect(made.status).toBe(201);
    const list = (await (await clerk.send(a, 'GET', '/api/ranches?limit=100')).json()) as { items: { name: string }[] };
    expect(list.items.map((r) => r.name)).toContain('Ranch Written On B');
    // A token that is not the session's is refused on B as on A.
    clerk.csrf = 'not-the-token';
    expect((await clerk.send(b, 'POST', '/api/ranches', { name: 'Refused' })).status).toBe(403);
  });

  it('creates a walk on A and reads it on B; uploads its photo on A and downloads it from B', async () => {
    const sampler = new Client();
    expect((await sampler.signIn(a, 'sampler@crowntip.test')).status).toBe(200);
    const plantingId = await duePlanting(sampler, b);
    const id = randomUUID();
    const created = await sampler.send(a, 'POST', '/api/walks', walkBody(id, plantingId));
    expect(created.status).toBe(201);
    const read = await sampler.send(b, 'GET', `/api/walks/${id}`);
    expect(read.status).toBe(200);
    expect(((await read.json()) as { plants: unknown[] }).plants).toHaveLength(3);

    const form = new FormData();
    form.set('stop', '2');
    form.set('photo', new Blob([TINY_PNG], { type: 'image/png' }), 'stop.png');
    const up = await sampler.send(a, 'POST', `/api/walks/${id}/photos`, form);
    expect(up.status).toBe(201);
    const photo = (await up.json()) as { url: string };
    const down = await sampler.send(b, 'GET', photo.url);
    expect(down.status).toBe(200);
    expect(down.headers.get('cache-control')).toBe('no-store');
    expect(Buffer.from(await down.arrayBuffer()).equals(TINY_PNG)).toBe(true);
    // Not public: without the session, and for another organisation, there is nothing there.
    expect((await send(`${b.url}${photo.url}`)).status).toBe(401);
    const other = new Client();
    expect((await other.signIn(b, 'clerk@quillwater.test')).status).toBe(200);
    expect((await other.send(b, 'GET', photo.url)).status).toBe(404);
  });

  it('starts an organisation register build on A, and polls and downloads it on B', async () => {
    const clerk = new Client();
    expect((await clerk.signIn(a, 'clerk@crowntip.test')).status).toBe(200);
    const started = await clerk.send(a, 'POST', '/registers/jobs', { year: String(new Date().getUTCFullYear()) });
    expect(started.status).toBe(202);
    const { statusUrl } = (await started.json()) as { statusUrl: string };
    let status: { phase: string; percent: number; result?: { rows: number; csvUrl: string; pdfUrl: string } } = { phase: 'queued', percent: 0 };
    for (let i = 0; status.phase !== 'done' && status.phase !== 'failed'; i++) {
      if (i > 600) throw new Error(`the build did not finish: ${JSON.stringify(status)}`);
      await new Promise((r) => setTimeout(r, 100));
      const res = await clerk.send(b, 'GET', statusUrl);
      expect(res.status).toBe(200);
      status = (await res.json()) as typeof status;
    }
    expect(status.phase).toBe('done');
    const csvOnB = await clerk.send(b, 'GET', status.result!.csvUrl);
    expect(csvOnB.status).toBe(200);
    expect(csvOnB.headers.get('content-type')).toMatch(/^text\/csv/);
    const csv = await csvOnB.text();
    expect(csv.trim().split('\n').length).toBeGreaterThan(1);
    expect(await (await clerk.send(a, 'GET', status.result!.csvUrl)).text()).toBe(csv);
    const pdf = Buffer.from(await (await clerk.send(b, 'GET', status.result!.pdfUrl)).arrayBuffer());
    expect(pdf.subarray(0, 5).toString()).toBe('%PDF-');
    // Another organisation cannot see it on either server.
    const other = new Client();
    expect((await other.signIn(b, 'clerk@quillwater.test')).status).toBe(200);
    expect((await other.send(b, 'GET', statusUrl)).status).toBe(404);
  }, 90_000);

  it('counts failed sign-ins on A and B against one limit', async () => {
    const client = new Client();
    // Five wrong passwords for one account from one address, alternating between the servers.
    for (let i = 0; i < 5; i++) expect((await client.signIn(i % 2 ? b : a, 'auditor@crowntip.test', `wrong-${i}-xxxxxx`)).status).toBe(401);
    // SIGNIN_LIMIT_PER_PAIR is 5: the sixth try waits on either server, even with the right password
    // (with counters per server, each would have seen only two or three failures and let it in).
    const sixth = await client.signIn(a, 'auditor@crowntip.test');
    expect(sixth.status).toBe(429);
    expect((await client.signIn(b, 'auditor@crowntip.test')).status).toBe(429);
  });

  it('runs the daily reminder on both servers and sends each sampler one e-mail', async () => {
    // Each server checks a minute after its start; wait until both have checked and one has sent.
    const since = new Date(startedAt).toISOString();
    for (let i = 0; ; i++) {
      const run = await db('job_runs').where({ job: 'sampling-reminders', run_on: todayIso() }).whereNotNull('finished_at').first();
      if (run && Date.now() - startedAt > 75_000) break;
      if (i > 240) throw new Error('no reminder run was finished within two minutes of the start');
      await new Promise((r) => setTimeout(r, 500));
    }
    const mails = await db('mail_outbox').where('created_at', '>=', since).andWhere('subject', 'like', 'Crowntip: % to walk before termination');
    expect(mails.length).toBeGreaterThan(0);
    const recipients = mails.map((m: { to_address: string }) => m.to_address);
    expect(new Set(recipients).size).toBe(recipients.length);
    expect(await db('job_runs').where({ job: 'sampling-reminders', run_on: todayIso() })).toHaveLength(1);
    // One server sent them; the other found today's run claimed.
    const sent = [a, b].filter((s) => s.output().includes('sampling reminders sent'));
    expect(sent).toHaveLength(1);
  }, 150_000);

  it('stores every acknowledged walk exactly once while A is killed (SIGKILL) under 50 clients', async () => {
    const CLIENTS = 50;
    const WALKS_EACH = 4;
    const KILL_AFTER = 40; // acknowledged walks before A is killed, so requests are in flight on it
    const clients = await Promise.all(
      Array.from({ length: CLIENTS }, async (_, i) => {
        const c = new Client();
        const res = await c.signIn(i % 2 ? b : a, i % 3 ? 'sampler@crowntip.test' : 'sampler2@crowntip.test');
        expect(res.status).toBe(200);
        return c;
      }),
    );
    const plantingId = await duePlanting(at(clients, 0), a);

    const acknowledged = new Map<string, { client: number; by: string; attempts: number }>();
    let failedAttempts = 0;
    let killed: Promise<number | null> | null = null;
    const alive = () => (killed ? [b] : [a, b]);

    await Promise.all(
      clients.map(async (client, i) => {
        for (let k = 0; k < WALKS_EACH; k++) {
          const id = randomUUID();
          // Create, then submit; both are safe to repeat with the same id, so any failure
          // (a cut connection, a 5xx) is retried on a server that answers.
          for (let attempt = 0; ; attempt++) {
            if (attempt > 20) throw new Error(`walk ${id} was never acknowledged`);
            const servers = alive();
            const server = at(servers, (i + k + attempt) % servers.length);
            try {
              const created = await client.send(server, 'POST', '/api/walks', walkBody(id, plantingId));
              if (created.status >= 500) throw new Error(`create answered ${created.status}`);
              expect([200, 201], `create: ${await created.clone().text()}`).toContain(created.status);
              const submitted = await client.send(server, 'POST', `/api/walks/${id}/submit`);
              if (submitted.status >= 500) throw new Error(`submit answered ${submitted.status}`);
              expect(submitted.status, `submit: ${await submitted.clone().text()}`).toBe(200);
              acknowledged.set(id, { client: i, by: server === a ? 'A' : 'B', attempts: attempt + 1 });
              break;
            } catch (err) {
              if ((err as Error).name === 'AssertionError') throw err;
              failedAttempts++;
              await new Promise((r) => setTimeout(r, 50));
            }
          }
          if (!killed && acknowledged.size >= KILL_AFTER) killed = a.signal('SIGKILL');
        }
      }),
    );
    expect(await killed).toBeNull(); // ended by the signal, not by exiting

    const ids = [...acknowledged.keys()];
    expect(ids).toHaveLength(CLIENTS * WALKS_EACH);
    expect([...acknowledged.values()].filter((v) => v.by === 'A').length).toBeGreaterThanOrEqual(KILL_AFTER / 4);
    // The kill cut requests in flight, and their retries went to B.
    expect(failedAttempts).toBeGreaterThan(0);

    const rows = await db('field_walks').whereIn('id', ids).select('id', 'status');
    expect(rows).toHaveLength(ids.length);
    expect(rows.every((r: { status: string }) => r.status === 'submitted')).toBe(true);
    const plants = await db('walk_plants').whereIn('walk_id', ids).count({ n: '*' }).first();
    expect(Number(plants!.n)).toBe(ids.length * 3);
    // B still answers after its peer died, and says it is ready.
    expect((await send(`${b.url}/readyz`)).status).toBe(200);
  }, 240_000);
});
