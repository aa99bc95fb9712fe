/**
 * HTTP load against the real server (bench/server-process.ts) and a bare Express JSON route
 * (bench/bare-target.ts), each in its own process, from this one: 50 connections, rounds of a few
 * seconds, over loopback. Requests carry the headers a browser sends (cookie, Accept-Encoding), so
 * the server does the work it does for users. Every run is bounded in time and stops by itself.
 */
import { spawn } from 'node:child_process';
import http from 'node:http';
import { randomUUID } from 'node:crypto';
import { createInterface } from 'node:readline';
import autocannon from 'autocannon';

export const CONNECTIONS = 50;
export const SECONDS = Number(process.env.BENCH_HTTP_SECONDS ?? 5);
const BROWSER_HEADERS = { 'accept-encoding': 'gzip, deflate, br', accept: 'application/json' };

export interface LoadResult {
  rps: number;
  p99: number;
  requests: number;
  non2xx: number;
}

export async function startBare(env: Record<string, string> = {}) {
  const child = spawn(process.execPath, ['--import', 'tsx', 'bench/bare-target.ts'], { stdio: ['ignore', 'pipe', 'inherit'], env: { ...process.env, ...env } });
  const line = await new Promise<string>((resolve, reject) => {
    createInterface({ input: child.stdout! }).once('line', resolve);
    child.once('exit', (code) => reject(new Error(`bare Express target exited with ${code}`)));
  });
  const { url } = JSON.parse(line) as { url: string };
  const stop = () => child.exitCode === null && child.kill('SIGTERM');
  process.once('exit', stop); // also when the bench stops early
  return { url, pid: child.pid!, stop };
}

export interface Session {
  cookie: string;
  csrfToken: string;
}

/** Signs in through the API as a browser would; the cookie and the CSRF token for later requests. */
export async function signIn(url: string, email: string, password: string): Promise<Session> {
  const res = await fetch(`${url}/api/session`, {
    method: 'POST',
    headers: { 'content-type': 'application/json' },
    body: JSON.stringify({ email, password }),
  });
  if (!res.ok) throw new Error(`sign-in as ${email} answered ${res.status}`);
  const [cookie = ''] = String(res.headers.get('set-cookie') ?? '').split(';');
  const me = (await (await fetch(`${url}/api/session`, { headers: { cookie } })).json()) as { csrfToken: string };
  return { cookie, csrfToken: me.csrfToken };
}

/** One autocannon round of GETs on `url`. */
export async function loadGet(url: string, headers: Record<string, string> = {}): Promise<LoadResult> {
  const r = await autocannon({ url, connections: CONNECTIONS, duration: SECONDS, headers: { ...BROWSER_HEADERS, ...headers } });
  if (r.errors > 0 || r.timeouts > 0) throw new Error(`${url}: ${r.errors} errors, ${r.timeouts} timeouts`);
  return { rps: r.requests.average, p99: r.latency.p99, requests: r.requests.total, non2xx: r.non2xx };
}

/** The round with more requests per second. */
export const best = (a: LoadResult, b: LoadResult) => (b.rps > a.rps ? b : a);

// Walk submissions -----------------------------------------------------------------------------

export interface WalkLoadResult {
  walks: number;
  /** p99 of one walk's create + submit, one after the other (what the sampler waits for). */
  p99PairMs: number;
  /** p99 of each request on its own (create or submit). */
  p99RequestMs: number;
  walksPerSec: number;
  non2xx: number;
  /** Extra walks found afterwards (rows beyond the distinct ids sent) plus walks whose plants were doubled. */
  duplicates: number;
  retried: number;
}

function percentile(sorted: number[], p: number) {
  if (!sorted.length) return NaN;
  return sorted[Math.min(sorted.length - 1, Math.ceil((p / 100) * sorted.length) - 1)] ?? NaN;
}

/**
 * 50 samplers' phones at once, each sending a 10-plant walk and submitting it, again and again for
 * SECONDS. Every fourth walk is sent twice at the same moment (the outbox's retry racing the first
 * try after a lost answer), and its submit twice too: the server must keep one walk with 10 plants.
 */
export async function loadWalks(url: string, session: Session, plantingId: string, walkedOn: string): Promise<WalkLoadResult> {
  const agent = new http.Agent({ keepAlive: true, maxSockets: CONNECTIONS });
  const { hostname, port } = new URL(url);
  const headers = {
    ...BROWSER_HEADERS,
    cookie: session.cookie,
    'x-csrf-token': session.csrfToken,
    'content-type': 'application/json',
  };
  const post = (path: string, body: string) =>
    new Promise<{ status: number; ms: number; body: string }>((resolve, reject) => {
      const t0 = performance.now();
      const req = http.request({ agent, hostname, port, path, method: 'POST', headers: { ...headers, 'content-length': Buffer.byteLength(body) } }, (res) => {
        let text = '';
        res.setEncoding('utf8');
        res.on('data', (d) => (text += d));
        res.on('end', () => resolve({ status: res.statusCode ?? 0, ms: performance.now() - t0, body: text }));
      });
      req.on('error', reject);
      req.end(body);
    });
  const get = async (path: string) => {
    const res = await fetch(`${url}${path}`, { headers: { cookie: session.cookie } });
    return res.json() as Promise<{ total?: number; plants?: unknown[] }>;
  };

  const before = (await get('/api/walks?limit=1')).total ?? 0;
  const pairs: number[] = [];
  const requests: number[] = [];
  const ids = new Set<string>();
  const raced: string[] = [];
  let non2xx = 0;
  let n = 0;
  const ok = (s: number) => s >= 200 && s < 300;
  const end = performance.now() + SECONDS * 1000;
  const t0 = performance.now();

  const phone = async () => {
    while (performance.now() < end) {
      const id = randomUUID();
      const race = n++ % 4 === 0;
      const plants = Array.from({ length: 10 }, (_, i) => ({ stop: i + 1, lengthCm: 60 + ((i * 7 + n) % 35) + 0.5 }));
      const body = JSON.stringify({ id, plantingId, walkedOn, stage: 'Z31', notes: null, plants });
      const start = performance.now();
      const created = race ? await Promise.all([post('/api/walks', body), post('/api/walks', body)]) : [await post('/api/walks', body)];
      const submitted = race
        ? await Promise.all([post(`/api/walks/${id}/submit`, '{}'), post(`/api/walks/${id}/submit`, '{}')])
        : [await post(`/api/walks/${id}/submit`, '{}')];
      pairs.push(performance.now() - start);
      for (const r of [...created, ...submitted]) {
        requests.push(r.ms);
        if (!ok(r.status)) non2xx++;
      }
      if (created.some((r) => ok(r.status))) ids.add(id);
      if (race) raced.push(id);
    }
  };
  await Promise.all(Array.from({ length: CONNECTIONS }, phone));
  const elapsed = (performance.now() - t0) / 1000;
  agent.destroy();

  const after = (await get('/api/walks?limit=1')).total ?? 0;
  let duplicates = Math.max(0, after - before - ids.size);
  // Raced walks: each must have kept exactly its 10 plants.
  for (const id of raced.slice(0, 100)) {
    const walk = await get(`/api/walks/${id}`);
    if ((walk.plants?.length ?? 0) !== 10) duplicates++;
  }
  pairs.sort((a, b) => a - b);
  requests.sort((a, b) => a - b);
  return {
    walks: ids.size,
    p99PairMs: percentile(pairs, 99),
    p99RequestMs: percentile(requests, 99),
    walksPerSec: pairs.length / elapsed,
    non2xx,
    duplicates,
    retried: raced.length,
  };
}
