import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it, inject } from 'vitest';
import type { Knex } from 'knex';
import { createApp } from '../../server/app';
import { loadConfig } from '../../server/platform/config';
import { migrateLatest, openDatabase } from '../../server/platform/database';
import { finaliseRegister, reportingYearOf } from '../../server/registers/service';
import { keyringOf } from '../../server/registers/signing';
import { todayIso } from '../../shared/registry/season';
import { seedDemoScenario } from '../../seeds/01_demo_scenario';
import { DEMO_ORGANISATIONS, DEMO_USERS } from '../../seeds/demo-people';
import { DEMO_PASSWORD, signInApi, TEST_SESSION_SECRET, TEST_SIGNING_KEY } from '../helpers/app';
import { createThrowawayDatabase, dropDatabase } from '../helpers/postgres';
import { only } from '../helpers/lists';

/*
 * `npm run migrate-to-postgres` on the demo data: an SQLite file with the demo scenario, last
 * season's walks and that season's registers finalised, copied into a new PostgreSQL database. The
 * expected values are read from the SQLite side (counts, the API's answers), never from the copy.
 */
const run = inject('postgres')!;
let dir: string;
let file: string;
let target: { name: string; url: string };
let src: Knex;
let dest: Knex;
const ORG = DEMO_ORGANISATIONS[0].id;
const clerk = DEMO_USERS.find((u) => u.email === 'clerk@crowntip.test')!;

/** Sums of areas are added in another order by each engine: equal to 12 significant digits, not to the last bit. */
const rounded = (v: unknown): unknown =>
  typeof v === 'number' ? Number(v.toPrecision(12)) : Array.isArray(v) ? v.map(rounded) : v && typeof v === 'object' ? Object.fromEntries(Object.entries(v).map(([k, x]) => [k, rounded(x)])) : v;

const cli = (...args: string[]) =>
  spawnSync(process.execPath, ['--import', 'tsx', 'scripts/migrate-to-postgres.ts', ...args], { encoding: 'utf8', timeout: 120_000 });

beforeAll(async () => {
  dir = fs.mkdtempSync(path.join(os.tmpdir(), 'crowntip-copy-'));
  file = path.join(dir, 'crowntip.sqlite');
  src = openDatabase(file);
  await migrateLatest(src);
  await seedDemoScenario(src, { password: DEMO_PASSWORD, bcryptRounds: 4, history: true });
  const year = reportingYearOf(todayIso()) - 1;
  const ranches: { id: string }[] = await src('ranches').where('organisation_id', ORG).select('id');
  const config = loadConfig({ NODE_ENV: 'test', PUBLIC_URL: 'http://crowntip.test:3000' }, { BCRYPT_ROUNDS: 4, REGISTER_SIGNING_KEY: TEST_SIGNING_KEY });
  for (const r of ranches) await finaliseRegister(src, ORG, r.id, year, { id: clerk.id, name: clerk.name }, todayIso(), keyringOf(config));
  // One change in the registry, so that the change history (numbered by a sequence) has a row.
  const office = await signInApi(createApp({ config, db: src, sessionSecret: TEST_SESSION_SECRET }), 'clerk@crowntip.test');
  expect((await office.agent.post('/api/ranches').set('X-CSRF-Token', office.csrf).send({ name: 'Before The Copy' })).status).toBe(201);
  await new Promise((r) => setTimeout(r, 100)); // the session write after the answer
  await src.destroy();
  target = await createThrowawayDatabase(run.adminUrl, run.prefix);
}, 120_000);

afterAll(async () => {
  await dest?.destroy();
  await src?.destroy();
  await dropDatabase(run.adminUrl, target.name);
  fs.rmSync(dir, { recursive: true, force: true });
});

describe('npm run migrate-to-postgres', () => {
  it('copies every table with its ids, checks the counts and the register hashes, and the app answers the same', async () => {
    const out = cli('--from', file, '--to', target.url);
    expect(out.stderr).toBe('');
    expect(out.status).toBe(0);
    expect(out.stdout).toMatch(/Done: \d+ tables, \d+ rows, the same counts on both sides; [1-9]\d* finalised register\(s\) still match their stored hashes\./);

    src = openDatabase(file);
    dest = openDatabase(target.url);
    const tables = ['organisations', 'users', 'ranches', 'fields', 'plantings', 'calibrations', 'field_walks', 'walk_plants', 'credit_rules', 'registers', 'change_history', 'crops'];
    for (const t of tables) {
      const ids = async (db: Knex) => (await db(t).select('*')).map((r) => JSON.stringify(r.id ?? r.seq ?? r.code ?? null)).sort();
      expect(await ids(dest), t).toEqual(await ids(src));
    }
    const registers = only(await src('registers').count({ n: '*' }), 'count row');
    expect(Number(registers.n)).toBeGreaterThan(0);

    // The same questions to an app on each database get the same answers.
    const config = loadConfig({ NODE_ENV: 'test', PUBLIC_URL: 'http://crowntip.test:3000' }, { BCRYPT_ROUNDS: 4, REGISTER_SIGNING_KEY: TEST_SIGNING_KEY });
    const onSqlite = await signInApi(createApp({ config, db: src, sessionSecret: TEST_SESSION_SECRET }), 'clerk@crowntip.test');
    const onPostgres = await signInApi(createApp({ config, db: dest, sessionSecret: TEST_SESSION_SECRET }), 'clerk@crowntip.test');
    const [{ id: registerId }] = await src('registers').select('id').orderBy('id').limit(1);
    for (const url of [`/api/registers/${registerId}`, '/api/ranches', '/api/walks?status=approved', '/api/calibrations', '/api/rules/versions']) {
      const a = await onSqlite.agent.get(url);
      const b = await onPostgres.agent.get(url);
      expect(a.status, url).toBe(200);
      expect(rounded(b.body), url).toEqual(rounded(a.body));
    }
    expect((await onPostgres.agent.get(`/api/registers/${registerId}`)).body.hashVerified).toBe(true);

    // The change history's numbering continues after the copied rows instead of colliding with them.
    const before = Number(only(await dest('change_history').max({ m: 'seq' }), 'max row').m);
    expect(before).toBeGreaterThan(0);
    const ranch = await onPostgres.agent.post('/api/ranches').set('X-CSRF-Token', onPostgres.csrf).send({ name: 'Copied Ranch' });
    expect(ranch.status).toBe(201);
    const after = Number(only(await dest('change_history').max({ m: 'seq' }), 'max row').m);
    expect(after).toBeGreaterThan(before);
  }, 180_000);

  it('refuses to copy into a database that already holds organisations', () => {
    const out = cli('--from', file, '--to', target.url);
    expect(out.status).toBe(1);
    expect(out.stderr).toContain('already holds organisations');
  }, 120_000);
});
