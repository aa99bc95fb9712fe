/**
 * The server side of the HTTP bench, in its own process so that the load generator does not share
 * its thread: `bare` is a bare Express JSON route, `crowntip` the real app on a fresh database file
 * with the demo scenario. Prints one JSON line ({url, cookie}) once it is listening.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { AddressInfo } from 'node:net';
import express from 'express';
import request from 'supertest';
import { pino } from 'pino';
import { loadConfig } from '../server/platform/config';
import { createApp } from '../server/app';
import { migrateLatest, openDatabase } from '../server/platform/database';
import { openFastReads } from '../server/platform/fast-reads';
import { seedDemoScenario } from '../seeds/01_demo_scenario';

const mode = process.argv[2];
let app: express.Express;
let cleanup = () => {};
if (mode === 'bare') {
  app = express();
  app.get('/ping', (_req, res) => {
    res.json({ ok: true });
  });
} else {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'crowntip-bench-'));
  const file = path.join(dir, 'bench.sqlite');
  const db = openDatabase(file);
  await migrateLatest(db);
  await seedDemoScenario(db, { password: 'bench-password-1', bcryptRounds: 4 });
  const config = loadConfig({ NODE_ENV: 'production', LOG_LEVEL: 'warn' }, { BCRYPT_ROUNDS: 4 });
  app = createApp({ config, db, logger: pino({ level: 'warn' }), fastReads: openFastReads(file), sessionSecret: 'bench-secret-bench-secret-bench' });
  cleanup = () => fs.rmSync(dir, { recursive: true, force: true });
}
const server = app.listen(0, '127.0.0.1', async () => {
  const url = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  let cookie = '';
  if (mode !== 'bare') {
    const res = await request(url).post('/api/session').send({ email: 'clerk@crowntip.test', password: 'bench-password-1' });
    cookie = String(res.headers['set-cookie']?.[0] ?? '').split(';')[0];
  }
  console.log(JSON.stringify({ url, cookie }));
});
process.on('SIGTERM', () => {
  server.close();
  cleanup();
  process.exit(0);
});
