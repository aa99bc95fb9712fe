import { Writable } from 'node:stream';
import express from 'express';
import request from 'supertest';
import { pino } from 'pino';
import { afterEach, describe, expect, it } from 'vitest';
import { createApp } from '../../../server/app';
import { errorHandler } from '../../../server/platform/errors';
import { loggedPath, requestLog } from '../../../server/platform/request-log';
import { viewPermissions } from '../../../server/platform/permissions';
import { openDatabase, migrateLatest } from '../../../server/platform/database';
import { loadConfig } from '../../../server/platform/config';
import { seedDemoScenario } from '../../../seeds/01_demo_scenario';
import { DEMO_USERS } from '../../../seeds/demo-people';
import { DEMO_PASSWORD, TEST_SESSION_SECRET, TEST_SIGNING_KEY, settled } from '../../helpers/app';
import type { Knex } from 'knex';
import { at, only } from '../../helpers/lists';

// The request log (server/platform/request-log.ts) as production writes it: pino at info into a
// stream the test reads back line by line.

function captured(level = 'info') {
  const lines: Record<string, unknown>[] = [];
  const raw: string[] = [];
  const stream = new Writable({
    write(chunk, _enc, cb) {
      for (const l of String(chunk).split('\n').filter(Boolean)) {
        raw.push(l);
        lines.push(JSON.parse(l));
      }
      cb();
    },
  });
  return { logger: pino({ level }, stream), lines, raw };
}

const requestLines = (lines: Record<string, unknown>[]) => lines.filter((l) => l.msg === 'request');
/** Lets the 'finish' listener run after supertest has the answer. */
const tick = () => new Promise((r) => setTimeout(r, 20));

let db: Knex | null = null;
afterEach(async () => {
  if (db) {
    await settled(db);
    await db.destroy();
  }
  db = null;
});

async function appWithLog(level = 'info') {
  db = openDatabase(':memory:');
  await migrateLatest(db);
  await seedDemoScenario(db, { password: DEMO_PASSWORD, bcryptRounds: 4 });
  const config = loadConfig({ NODE_ENV: 'production', PUBLIC_URL: 'http://crowntip.test:3000' }, { BCRYPT_ROUNDS: 4, REGISTER_SIGNING_KEY: TEST_SIGNING_KEY });
  const log = captured(level);
  return { app: createApp({ config, db, logger: log.logger, sessionSecret: TEST_SESSION_SECRET }), ...log };
}

describe('request log', () => {
  it('writes one compact line per request: method, path, status, time, request id and user id; never headers or cookies', async () => {
    const { app, lines, raw } = await appWithLog();
    const agent = request.agent(app);
    const signIn = await agent.post('/api/session').send({ email: 'clerk@crowntip.test', password: DEMO_PASSWORD });
    expect(signIn.status).toBe(200);
    const cookie = String(signIn.headers['set-cookie']);
    const read = await agent.get('/api/fields?limit=5&q=North').set('Authorization', 'Bearer not-a-real-token').set('X-Secret-Note', 'kept-out');
    expect(read.status).toBe(200);
    await request(app).get('/healthz');
    await tick();

    const reqs = requestLines(lines);
    expect(reqs).toHaveLength(2); // sign-in and read; the health check writes nothing
    const [signInLine, line] = [at(reqs, 0), at(reqs, 1)];
    expect(Object.keys(line).sort()).toEqual(['hostname', 'level', 'method', 'ms', 'msg', 'path', 'pid', 'reqId', 'status', 'time', 'userId'].sort());
    const clerk = DEMO_USERS.find((u) => u.email === 'clerk@crowntip.test')!;
    expect(line).toMatchObject({ level: 30, method: 'GET', path: '/api/fields', status: 200, userId: clerk.id });
    expect(signInLine).toMatchObject({ method: 'POST', path: '/api/session', status: 200, userId: clerk.id }); // signed in by the end
    expect(typeof line.ms).toBe('number');
    expect(line.ms as number).toBeGreaterThan(0);
    // The id is the one the answer carried, and differs from the first request's.
    expect(line.reqId).toBe(read.headers['x-request-id']);
    expect(line.reqId).not.toBe(signInLine.reqId);

    // Nothing of the headers, the cookie, the query or the body, in any line.
    const sid = at(/crowntip\.sid=([^;]+)/.exec(cookie) ?? [], 1, 'session cookie value');
    for (const l of raw) {
      expect(l).not.toMatch(/"(headers|cookie|set-cookie|authorization|req|res)"/i);
      expect(l).not.toContain(decodeURIComponent(sid).slice(0, 20));
      expect(l).not.toContain('not-a-real-token');
      expect(l).not.toContain('kept-out');
      expect(l).not.toContain('North');
      expect(l).not.toContain(DEMO_PASSWORD);
    }
    expect(Buffer.byteLength(at(raw, -1))).toBeLessThan(250); // compact: one short line
  });

  it('keeps a plain request id from a proxy, refuses one that could forge a line, and hides one-time link tokens', async () => {
    const { app, lines } = await appWithLog();
    await request(app).get('/login').set('X-Request-Id', 'lb-7f3a.2');
    await request(app).get('/login').set('X-Request-Id', 'x"} {"forged":1');
    await request(app).get('/password/reset/4f9c2a1be0d7');
    await tick();
    const reqs = requestLines(lines);
    expect(reqs).toHaveLength(3);
    expect(at(reqs, 0)).toMatchObject({ reqId: 'lb-7f3a.2', path: '/login', userId: null });
    expect(at(reqs, 1).reqId).toMatch(/^[0-9a-f]{8}-[0-9a-z]+$/);
    expect(JSON.stringify(lines)).not.toContain('forged');
    expect(at(reqs, 2).path).toBe('/password/reset/:token');
    expect(JSON.stringify(lines)).not.toContain('4f9c2a1be0d7');
  });

  it('writes nothing per request at LOG_LEVEL=warn', async () => {
    const { app, lines } = await appWithLog('warn');
    expect((await request(app).get('/login')).headers['x-request-id']).toBeUndefined();
    await tick();
    expect(lines).toHaveLength(0);
  });

  it('logs an error in full (message and stack) apart, under the request line’s id', async () => {
    const { logger, lines } = captured();
    const app = express();
    app.use(requestLog(logger)!);
    app.get('/boom', () => {
      throw new Error('the planting table was unreadable', { cause: new Error('disk I/O error') });
    });
    app.use(errorHandler(logger, viewPermissions));
    const res = await request(app).get('/boom?ranch=North').set('Cookie', 'crowntip.sid=s%3Asecret');
    expect(res.status).toBe(500);
    await tick();
    const error = lines.find((l) => l.msg === 'unhandled error') as { err: { message: string; stack: string; cause?: { message: string } }; reqId: string; path: string; level: number };
    expect(error.level).toBe(50);
    expect(error.err.message).toMatch(/^the planting table was unreadable/);
    expect(error.err.stack).toContain('request-log.test.ts'); // where it was thrown
    expect(JSON.stringify(error.err)).toContain('disk I/O error'); // and its cause
    expect(error.path).toBe('/boom');
    const line = only(requestLines(lines), 'request line');
    expect(line).toMatchObject({ status: 500, path: '/boom' });
    expect(error.reqId).toBe(line.reqId);
    expect(JSON.stringify(lines)).not.toContain('secret');
  });
});

describe('loggedPath', () => {
  it.each([
    ['/api/fields?limit=50&q=North', '/api/fields'],
    ['/invite/abc123DEF', '/invite/:token'],
    ['/password/reset/abc?x=1', '/password/reset/:token'],
    ['/password/forgot', '/password/forgot'],
    ['/capture/walk/9', '/capture/walk/9'],
  ])('%s → %s', (url, expected) => {
    expect(loggedPath(url)).toBe(expected);
  });
});
