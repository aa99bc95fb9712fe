import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import request from 'supertest';
import type { Express } from 'express';
import type { Knex } from 'knex';
import { loadConfig } from '../../../server/platform/config';
import { createApp } from '../../../server/app';
import { migrateLatest, openDatabase } from '../../../server/platform/database';
import { openFastReads, type FastReads } from '../../../server/platform/fast-reads';
import { seedDemoScenario } from '../../../seeds/01_demo_scenario';

// The server's prepared-statement reads of sessions and users on a database file must behave
// exactly like the Knex reads: the same sessions found, and changes to users seen at once.
let dir: string;
let db: Knex;
let fast: FastReads;
let app: Express;

beforeEach(async () => {
  dir = fs.mkdtempSync(path.join(os.tmpdir(), 'crowntip-fast-'));
  const file = path.join(dir, 'db.sqlite');
  db = openDatabase(file);
  await migrateLatest(db);
  await seedDemoScenario(db, { password: 'fast-reads-password', bcryptRounds: 4 });
  fast = openFastReads(file)!;
  const config = loadConfig({ NODE_ENV: 'test' }, { BCRYPT_ROUNDS: 4 });
  app = createApp({ config, db, fastReads: fast, sessionSecret: 'fast-secret-fast-secret-fast-secret' });
});

afterEach(async () => {
  fast.close();
  await db.destroy();
  fs.rmSync(dir, { recursive: true, force: true });
});

describe('fast session and user reads on a database file', () => {
  it('keeps a signed-in session and drops it the moment the user is deactivated', async () => {
    const agent = request.agent(app);
    expect((await agent.post('/api/session').send({ email: 'clerk@crowntip.test', password: 'fast-reads-password' })).status).toBe(200);
    const me = await agent.get('/api/session');
    expect(me.status).toBe(200);
    expect(me.body.user).toMatchObject({ email: 'clerk@crowntip.test', role: 'clerk', organisation: { name: 'Bramblecrest Growers (demo)' } });

    await db('users').where('email', 'clerk@crowntip.test').update({ role: 'auditor' });
    expect((await agent.get('/api/session')).body.user.role).toBe('auditor');
    await db('users').where('email', 'clerk@crowntip.test').update({ active: false });
    expect((await agent.get('/api/session')).status).toBe(401);
  });

  it('does not find an expired or unknown session', async () => {
    expect(fast.sessionJson('no-such-session', new Date().toISOString())).toBeUndefined();
    await db('sessions').insert({ sid: 'old', sess: '{"cookie":{}}', expired: '2020-01-01T00:00:00.000Z' });
    expect(fast.sessionJson('old', new Date().toISOString())).toBeUndefined();
    await db('sessions').insert({ sid: 'fresh', sess: '{"cookie":{}}', expired: '2999-01-01T00:00:00.000Z' });
    expect(fast.sessionJson('fresh', new Date().toISOString())).toBe('{"cookie":{}}');
  });
});
