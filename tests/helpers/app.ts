import request from 'supertest';
import type { Express } from 'express';
import type { Knex } from 'knex';
import { loadConfig, type Config } from '../../server/platform/config';
import { createApp } from '../../server/app';
import { openDatabase, migrateLatest } from '../../server/platform/database';
import { seedDemoScenario } from '../../seeds/01_demo_scenario';

export const DEMO_PASSWORD = 'test-demo-password';

export interface TestApp {
  app: Express;
  db: Knex;
  config: Config;
  close: () => Promise<void>;
}

/** A fresh app on its own in-memory database, migrated and loaded with the demo scenario. */
export async function createTestApp(overrides: Partial<Config> = {}, { seed = true } = {}): Promise<TestApp> {
  const config = loadConfig({ NODE_ENV: 'test', PUBLIC_URL: 'http://crowntip.test:3000' }, { BCRYPT_ROUNDS: 4, ...overrides });
  const db = openDatabase(':memory:');
  await migrateLatest(db);
  if (seed) await seedDemoScenario(db, { password: DEMO_PASSWORD, bcryptRounds: 4 });
  const app = createApp({ config, db, sessionSecret: 'test-secret-test-secret-test-secret' });
  return { app, db, config, close: () => db.destroy() };
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
  if (!m) throw new Error('no CSRF token in the page');
  return m[1];
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
