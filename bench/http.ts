/**
 * Signed-in read speed against bare Express, on this machine, over loopback only.
 * Goal (../shared/STACK.md, 14): a signed-in JSON read at 40 % or more of a bare Express route.
 * Each run is bounded in time and connections and stops by itself.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { AddressInfo } from 'node:net';
import express from 'express';
import autocannon from 'autocannon';
import request from 'supertest';
import { pino } from 'pino';
import { loadConfig } from '../server/config';
import { createApp } from '../server/app';
import { migrateLatest, openDatabase } from '../server/db/knex';
import { openFastReads } from '../server/db/fast-reads';
import { seedDemoScenario } from '../seeds/01_demo_scenario';

const SECONDS = Number(process.env.BENCH_HTTP_SECONDS ?? 6);
const CONNECTIONS = 50;

async function measure(url: string, headers: Record<string, string> = {}): Promise<number> {
  const result = await autocannon({ url, connections: CONNECTIONS, duration: SECONDS, headers });
  if (result.non2xx > 0) throw new Error(`${url}: ${result.non2xx} answers were not 2xx`);
  return result.requests.average;
}

function listen(app: express.Express): Promise<{ url: string; close: () => void }> {
  return new Promise((resolve) => {
    const server = app.listen(0, '127.0.0.1', () => {
      const { port } = server.address() as AddressInfo;
      resolve({ url: `http://127.0.0.1:${port}`, close: () => server.close() });
    });
  });
}

export async function runHttpBench() {
  const bare = express();
  bare.get('/ping', (_req, res) => {
    res.json({ ok: true });
  });
  const bareServer = await listen(bare);

  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'crowntip-bench-'));
  const db = openDatabase(path.join(dir, 'bench.sqlite'));
  await migrateLatest(db);
  await seedDemoScenario(db, { password: 'bench-password-1', bcryptRounds: 4 });
  const config = loadConfig({ NODE_ENV: 'production', LOG_LEVEL: 'warn' }, { BCRYPT_ROUNDS: 4 });
  const app = createApp({ config, db, logger: pino({ level: 'warn' }), fastReads: openFastReads(path.join(dir, 'bench.sqlite')), sessionSecret: 'bench-secret-bench-secret-bench' });
  const crowntip = await listen(app);

  const signIn = await request(crowntip.url).post('/api/session').send({ email: 'clerk@crowntip.test', password: 'bench-password-1' });
  const cookie = String(signIn.headers['set-cookie']?.[0] ?? '').split(';')[0];

  const bareRps = await measure(`${bareServer.url}/ping`);
  const sessionRps = await measure(`${crowntip.url}/api/session`, { cookie });
  const ranchesRps = await measure(`${crowntip.url}/api/ranches?limit=10`, { cookie });
  bareServer.close();
  crowntip.close();
  await db.destroy();
  fs.rmSync(dir, { recursive: true, force: true });

  console.log(`\nSigned-in reads vs bare Express (${CONNECTIONS} connections, ${SECONDS} s each, loopback)`);
  console.log(`  bare Express JSON route        ${bareRps.toFixed(0).padStart(6)} req/s`);
  console.log(`  GET /api/session (signed in)    ${sessionRps.toFixed(0).padStart(6)} req/s  ${((100 * sessionRps) / bareRps).toFixed(0)} % of bare (goal ≥ 40 %)`);
  console.log(`  GET /api/ranches?limit=10       ${ranchesRps.toFixed(0).padStart(6)} req/s  ${((100 * ranchesRps) / bareRps).toFixed(0)} % of bare`);
}
