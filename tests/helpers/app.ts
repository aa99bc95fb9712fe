import request from 'supertest';
import { inject } from 'vitest';
import type { Express } from 'express';
import type { Knex } from 'knex';
import { loadConfig, type Config } from '../../server/platform/config';
import { createApp } from '../../server/app';
import { openDatabase, migrateLatest } from '../../server/platform/database';
import { createJobQueue, type JobQueue } from '../../server/platform/jobs';
import { pino } from 'pino';
import { seedDemoScenario } from '../../seeds/01_demo_scenario';
import { createThrowawayDatabase, dropDatabase } from './postgres';

export const DEMO_PASSWORD = 'test-demo-password';
/** The register signing key of test apps (invented). */
export const TEST_SIGNING_KEY = 'test-register-signing-key-0123456789abcdef';

export interface TestApp {
  app: Express;
  db: Knex;
  config: Config;
  /** Where the database lives: ':memory:' on SQLite, its postgres:// address on PostgreSQL. */
  target: string;
  /** The app's job queue (in-process on SQLite, pg-boss on PostgreSQL); close() stops it. */
  jobs: JobQueue;
  close: () => Promise<void>;
}

/** Which engine the server tests run on: the postgres project (vitest.config.ts) provides one. */
export const testEngine = (): 'sqlite' | 'postgres' => (inject('postgres') ? 'postgres' : 'sqlite');

/** Migrates a fresh database and, with `seed`, loads the demo scenario as every test expects it. */
export async function prepareTestDatabase(db: Knex, seed: boolean): Promise<void> {
  await migrateLatest(db);
  if (seed) await seedDemoScenario(db, { password: DEMO_PASSWORD, bcryptRounds: 4 });
}

/** Waits (up to 2 s) for writes a response did not wait for (a session save, a sign-in time) to finish. */
export async function settled(db: Knex): Promise<void> {
  const pool = (db.client as { pool?: { numUsed(): number; numPendingAcquires(): number; numPendingCreates(): number } }).pool;
  for (let i = 0; pool && i < 200 && pool.numUsed() + pool.numPendingAcquires() + pool.numPendingCreates() > 0; i++) {
    await new Promise((r) => setTimeout(r, 10));
  }
}

export const TEST_SESSION_SECRET = 'test-secret-test-secret-test-secret';

// One database copied ahead per template, so that a test does not wait for the copy (~0.2 s).
const spare = new Map<string, Promise<{ name: string; url: string }>>();
function takeDatabase(run: { adminUrl: string; prefix: string }, template: string) {
  const next = spare.get(template) ?? createThrowawayDatabase(run.adminUrl, run.prefix, template);
  const ahead = createThrowawayDatabase(run.adminUrl, run.prefix, template);
  ahead.catch(() => {}); // a failure shows when it is taken
  spare.set(template, ahead);
  return next;
}

/**
 * A fresh app on its own database, migrated and loaded with the demo scenario: in memory on
 * SQLite; in the postgres project, a throwaway PostgreSQL database copied from the run's template
 * and dropped by close(). With `sameDatabaseAs`, a second app server on that app's database (its
 * own pool and job queue on PostgreSQL; on SQLite the same in-memory database), as behind a load
 * balancer; its close() leaves the database to the first.
 */
export async function createTestApp(overrides: Partial<Config> = {}, { seed = true, sameDatabaseAs }: { seed?: boolean; sameDatabaseAs?: TestApp } = {}): Promise<TestApp> {
  const config = loadConfig({ NODE_ENV: 'test', PUBLIC_URL: 'http://crowntip.test:3000' }, { BCRYPT_ROUNDS: 4, REGISTER_SIGNING_KEY: TEST_SIGNING_KEY, ...overrides });
  const pgRun = inject('postgres');
  let db: Knex;
  let target = ':memory:';
  let drop = async () => {};
  let release = async () => {};
  if (sameDatabaseAs) {
    target = sameDatabaseAs.target;
    db = pgRun ? openDatabase(target, { poolMax: 4 }) : sameDatabaseAs.db;
    if (pgRun) release = () => db.destroy();
  } else if (pgRun) {
    const made = await takeDatabase(pgRun, seed ? pgRun.seededTemplate : pgRun.emptyTemplate);
    target = made.url;
    db = openDatabase(made.url, { poolMax: 4 });
    release = () => db.destroy();
    // Not awaited: the next test need not wait for it; the run's teardown drops any left behind.
    drop = async () => void dropDatabase(pgRun.adminUrl, made.name).catch(() => {});
  } else {
    db = openDatabase(':memory:');
    release = () => db.destroy();
    await prepareTestDatabase(db, seed);
  }
  // Jobs are looked for every half second on PostgreSQL (2 s in production) so tests wait less.
  const jobs = createJobQueue(db, { logger: pino({ level: 'silent' }), pollSeconds: 0.5, maintenanceSeconds: 1 });
  const app = createApp({ config, db, jobs, sessionSecret: TEST_SESSION_SECRET });
  return {
    app,
    db,
    config,
    target,
    jobs,
    close: async () => {
      await jobs.stop(1000);
      await settled(db);
      await release();
      await drop();
    },
  };
}

/** A signed-in API client: its cookie jar and the CSRF token to send with every change. */
export async function signInApi(app: Express, email: string, password = DEMO_PASSWORD) {
  const agent = request.agent(app);
  const res = await agent.post('/api/session').send({ email, password });
  if (res.status !== 200) throw new Error(`sign-in of ${email} failed: ${res.status} ${JSON.stringify(res.body)}`);
  const session = await agent.get('/api/session');
  return { agent, csrf: session.body.csrfToken as string, user: session.body.user };
}

/** The hidden _csrf value of a rendered form. */
export function csrfFromHtml(html: string): string {
  const m = html.match(/name="_csrf" value="([^"]+)"/);
  if (!m?.[1]) throw new Error('no CSRF token in the page');
  return m[1];
}

/** Where a redirect answer points; throws (with the status) when the answer carries no Location. */
export function locationOf(res: { status: number; headers: Record<string, string | undefined> }): string {
  const location = res.headers.location;
  if (!location) throw new Error(`expected a redirect, got ${res.status} without a Location header`);
  return location;
}

/** A signed-in browser-like client for the office pages (form posts with the page's token). */
export async function signInPages(app: Express, email: string, password = DEMO_PASSWORD) {
  const agent = request.agent(app);
  const page = await agent.get('/login');
  const res = await agent.post('/login').type('form').send({ _csrf: csrfFromHtml(page.text), email, password });
  if (res.status !== 302) throw new Error(`page sign-in of ${email} failed: ${res.status}`);
  return agent;
}

export async function latestMail(db: Knex, to: string) {
  return db('mail_outbox').where('to_address', to).orderBy('created_at', 'desc').first();
}

export const linkIn = (text: string) => text.match(/https?:\/\/\S+/)?.[0] ?? '';
