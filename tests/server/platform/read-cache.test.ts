import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import Database from 'better-sqlite3';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import request from 'supertest';
import type { Express } from 'express';
import type { Knex } from 'knex';
import { loadConfig } from '../../../server/platform/config';
import { createApp } from '../../../server/app';
import { migrateLatest, openDatabase } from '../../../server/platform/database';
import { openFastReads, type FastReads } from '../../../server/platform/fast-reads';
import { seedDemoScenario } from '../../../seeds/01_demo_scenario';

// List answers kept while the database file is unchanged: a repeated read runs no query, any
// write (this server's or another process's) is seen on the next read, and one organisation's
// kept answer never reaches another. The demo scenario is the invented one of seeds/.
const PASSWORD = 'read-cache-password';
let dir: string;
let file: string;
let db: Knex;
let fast: FastReads;
let app: Express;
let queries: string[];

beforeEach(async () => {
  dir = fs.mkdtempSync(path.join(os.tmpdir(), 'crowntip-read-cache-'));
  file = path.join(dir, 'db.sqlite');
  db = openDatabase(file);
  await migrateLatest(db);
  await seedDemoScenario(db, { password: PASSWORD, bcryptRounds: 4 });
  fast = openFastReads(file)!;
  app = createApp({ config: loadConfig({ NODE_ENV: 'test' }, { BCRYPT_ROUNDS: 4 }), db, fastReads: fast, sessionSecret: 'cache-secret-cache-secret-cache' });
  queries = [];
  db.on('query', (q: { sql: string }) => queries.push(q.sql));
});

afterEach(async () => {
  fast.close();
  await db.destroy();
  fs.rmSync(dir, { recursive: true, force: true });
});

async function signIn(email: string) {
  const agent = request.agent(app);
  const res = await agent.post('/api/session').send({ email, password: PASSWORD });
  expect(res.status).toBe(200);
  return { agent, csrf: res.body.csrfToken as string };
}

const listQueries = () => queries.filter((q) => /from [`"]fields[`"]|from [`"]ranches[`"]/.test(q));

describe('kept list answers', () => {
  it('answers a repeated list without a query, and the first read after a write afresh', async () => {
    const { agent, csrf } = await signIn('clerk@crowntip.test');
    await agent.get('/api/session'); // the session's first sliding-expiry write is a change too
    const first = await agent.get('/api/fields?limit=50');
    expect(first.status).toBe(200);
    const before = listQueries().length;
    expect(before).toBeGreaterThan(0);
    const again = await agent.get('/api/fields?limit=50');
    expect(again.body).toEqual(first.body);
    expect(listQueries().length).toBe(before); // served as kept

    // A write through the API: the next read counts the new field.
    const ranchId = first.body.items[0].ranchId as string;
    const created = await agent.post('/api/fields').set('x-csrf-token', csrf).send({ ranchId, name: 'Kept Answer Block', areaHa: 3 });
    expect(created.status).toBe(201);
    const after = await agent.get('/api/fields?limit=50');
    expect(after.body.total).toBe(first.body.total + 1);
    expect(after.body.items.map((f: { name: string }) => f.name)).toContain('Kept Answer Block');
  });

  it('sees a change committed by another process on the next read', async () => {
    const { agent } = await signIn('clerk@crowntip.test');
    await agent.get('/api/session');
    const first = await agent.get('/api/ranches?limit=10');
    expect((await agent.get('/api/ranches?limit=10')).body).toEqual(first.body);
    const ranch = first.body.items[0] as { id: string; name: string };
    const other = new Database(file);
    other.prepare('update ranches set name = ? where id = ?').run('Renamed Elsewhere Ranch', ranch.id);
    other.close();
    const after = await agent.get('/api/ranches?limit=10');
    expect(after.body.items.map((r: { name: string }) => r.name)).toContain('Renamed Elsewhere Ranch');
  });

  it('keeps one answer per organisation: the same query from another organisation gets its own', async () => {
    const us = await signIn('clerk@crowntip.test');
    const them = await signIn('clerk@quillwater.test');
    await us.agent.get('/api/session'); // both sessions' first sliding-expiry writes, before the reads
    await them.agent.get('/api/session');
    const ours = await us.agent.get('/api/fields?limit=50');
    const theirs = await them.agent.get('/api/fields?limit=50');
    expect(theirs.status).toBe(200);
    const ourIds = new Set(ours.body.items.map((f: { id: string }) => f.id));
    expect(theirs.body.items.length).toBeGreaterThan(0);
    expect(theirs.body.items.some((f: { id: string }) => ourIds.has(f.id))).toBe(false);
  });

  it('refuses the kept list after sign-out', async () => {
    const { agent, csrf } = await signIn('clerk@crowntip.test');
    expect((await agent.get('/api/fields?limit=50')).status).toBe(200);
    expect((await agent.delete('/api/session').set('x-csrf-token', csrf)).status).toBe(204);
    expect((await agent.get('/api/fields?limit=50')).status).toBe(401);
  });

  it('sends the kept answer compressed as the browser accepts, the same JSON once decoded', async () => {
    const { agent } = await signIn('clerk@crowntip.test');
    const plain = await agent.get('/api/fields?limit=50').set('accept-encoding', 'identity');
    expect(plain.headers['content-encoding']).toBeUndefined();
    // The client decodes by the Content-Encoding named: the same JSON means the bytes were that encoding.
    for (const encoding of ['br', 'gzip']) {
      const res = await agent.get('/api/fields?limit=50').set('accept-encoding', encoding);
      expect(res.headers['content-encoding']).toBe(encoding);
      expect(res.headers.vary).toMatch(/accept-encoding/i);
      expect(res.body).toEqual(plain.body);
    }
  });
});
