import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import request from 'supertest';
import { createTestApp, type TestApp } from '../../helpers/app';

let t: TestApp;
beforeEach(async () => {
  t = await createTestApp();
});
afterEach(async () => {
  await t.close();
});

describe('security headers', () => {
  it('every answer allows only the app’s own scripts, styles and fonts', async () => {
    for (const path of ['/login', '/api/session', '/healthz']) {
      const res = await request(t.app).get(path);
      const csp = res.headers['content-security-policy'];
      expect(csp, path).toContain("default-src 'self'");
      expect(csp).toContain("script-src 'self'");
      expect(csp).not.toContain('unsafe-inline');
      expect(csp).toContain("font-src 'self'");
      expect(csp).toContain("frame-ancestors 'none'");
      // Served over plain HTTP on a farm network too (docs/server-notes.md, 4).
      expect(csp).not.toContain('upgrade-insecure-requests');
      expect(res.headers['x-content-type-options']).toBe('nosniff');
      expect(res.headers['x-powered-by']).toBeUndefined();
    }
  });

  it('the same headers on two answers in a row (worked out once, copied onto each)', async () => {
    const a = await request(t.app).get('/login');
    const b = await request(t.app).get('/nothing-here');
    expect(b.status).toBe(404);
    expect(b.headers['content-security-policy']).toBe(a.headers['content-security-policy']);
    expect(b.headers['strict-transport-security']).toBe(a.headers['strict-transport-security']);
  });
});
