import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import request from 'supertest';
import type { Express } from 'express';
import { createTestApp, signInApi, signInPages, type TestApp } from '../../helpers/app';

let t: TestApp;
beforeEach(async () => {
  t = await createTestApp();
});
afterEach(async () => {
  await t.close();
});

interface Layer {
  rawPath?: string | string[];
  route?: { path: string | string[]; methods: Record<string, boolean> };
  handle: { stack?: Layer[] };
}

/** Every GET path of the app's router table, as written (with :params), read from Express's own stack. */
function getRoutes(app: Express): string[] {
  const found: string[] = [];
  const walk = (stack: Layer[], prefix: string) => {
    for (const layer of stack) {
      const raw = layer.route ? layer.route.path : layer.rawPath;
      const paths = (Array.isArray(raw) ? raw : [raw ?? '']).filter((p): p is string => typeof p === 'string');
      for (const p of paths) {
        const full = (prefix + (p === '/' ? '' : p)).replace(/\/+/g, '/') || '/';
        if (layer.route?.methods.get) found.push(full);
        else if (!layer.route && layer.handle.stack) walk(layer.handle.stack, prefix + (p === '/' ? '' : p));
      }
    }
  };
  walk((app as unknown as { router: { stack: Layer[] } }).router.stack, '');
  return [...new Set(found)];
}

describe('cache policy', () => {
  it('every route of the router table answers a signed-in user with Cache-Control: no-store', async () => {
    // Real ids where the demo data has them (by the path's resource), so that pages and CSV answers
    // are reached with their content, not only as 404s.
    const first = async (table: string) => ((await t.db(table).first('id')) as { id: string } | undefined)?.id ?? 'none';
    const byResource: [RegExp, string][] = [
      [/\/ranches\//, await first('ranches')],
      [/\/fields\//, await first('fields')],
      [/\/plantings\//, await first('plantings')],
      [/\/calibrations\/(uploads\/)?:/, await first('calibrations')],
      [/\/walks\//, await first('field_walks')],
      [/\/outbox\//, await first('mail_outbox')],
    ];
    const fill = (path: string) => {
      const id = byResource.find(([re]) => re.test(path))?.[1] ?? 'none';
      return path
        .replace(/\{\*\w+\}/g, 'x')
        .replace(/:year/g, '2026')
        .replace(/:(\w+)/g, id);
    };
    const routes = getRoutes(t.app);
    expect(routes.length).toBeGreaterThan(40); // the walk found the whole table, not one router
    expect(routes).toEqual(expect.arrayContaining(['/office', '/api/walks', '/admin/outbox', '/registers']));

    const admin = await signInPages(t.app, 'admin@crowntip.test');
    const statuses: Record<number, number> = {};
    const types = new Set<string>();
    for (const route of routes) {
      const res = await admin.get(fill(route));
      statuses[res.status] = (statuses[res.status] ?? 0) + 1;
      if (res.status === 200) types.add(String(res.headers['content-type']).replace(/;.*/, ''));
      // The service worker is the same public file for everyone (server/platform/capture-app.ts); an
      // outbox message is kept from compression as well (server/platform/compress.ts).
      const expected = route === '/capture/sw.js' ? /^(no-store|no-cache)$/ : route === '/admin/outbox/:id' ? /^no-store, no-transform$/ : /^no-store$/;
      expect(res.headers['cache-control'], `${route} → ${res.status}`).toMatch(expected);
    }
    expect(statuses[200]).toBeGreaterThan(30); // most routes answered with their real content
    expect([...types]).toEqual(expect.arrayContaining(['text/html', 'application/json', 'text/csv']));
  }, 60_000);

  it('the sign-in answer itself, which carries the user and a token, is not stored', async () => {
    const res = await request(t.app).post('/api/session').send({ email: 'clerk@crowntip.test', password: 'test-demo-password' });
    expect(res.status).toBe(200);
    expect(res.headers['cache-control']).toBe('no-store');
  });
});

describe('error pages', () => {
  it('a 1.1 MB form post answers 413 with the error page, before any sign-in context exists', async () => {
    const body = `email=${'a'.repeat(1_100_000)}`;
    const res = await request(t.app).post('/login').type('form').send(body);
    expect(res.status).toBe(413);
    expect(res.headers['content-type']).toMatch(/text\/html/);
    expect(res.text).toContain('Error 413 (too_large)');
    expect(res.text).toContain('<html');
  });

  it('the same for a signed-in user posting too much to a page', async () => {
    const agent = await signInPages(t.app, 'clerk@crowntip.test');
    const res = await agent.post('/account/preferences').type('form').send(`units=${'m'.repeat(1_100_000)}`);
    expect(res.status).toBe(413);
    expect(res.text).toContain('Error 413 (too_large)');
  });
});

describe('anonymous API writes', () => {
  it('answer 401 unauthenticated before the CSRF check', async () => {
    for (const [method, path] of [
      ['post', '/api/walks'],
      ['patch', '/api/session'],
      ['put', '/api/ranches/x'],
      ['delete', '/api/walks/x'],
      ['post', '/api/nothing-here'],
    ] as const) {
      const res = await request(t.app)[method](path).send({});
      expect(res.status, `${method} ${path}`).toBe(401);
      expect(res.body.error.code).toBe('unauthenticated');
    }
  });

  it('a signed-in write without its token is still refused by the CSRF check', async () => {
    const { agent } = await signInApi(t.app, 'clerk@crowntip.test');
    const res = await agent.post('/api/ranches').send({ name: 'No token' });
    expect(res.status).toBe(403);
    expect(res.body.error.code).toBe('csrf');
  });
});
