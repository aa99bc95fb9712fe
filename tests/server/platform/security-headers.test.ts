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
    for (const path of ['/login', '/nothing-here', '/healthz']) {
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

  it('a JSON answer may load and be framed by nothing, keeps nosniff and its resource policy, and goes without the page-only headers', async () => {
    for (const path of ['/api/session', '/api/fields', '/api/nothing-here']) {
      const res = await request(t.app).get(path);
      expect(res.headers['content-type'], path).toMatch(/^application\/json/);
      // OWASP REST Security Cheat Sheet, "Security headers" (from memory): for an API, a content policy of
      // `default-src 'none'` with `frame-ancestors 'none'`, and X-Content-Type-Options: nosniff.
      expect(res.headers['content-security-policy'], path).toBe("default-src 'none'; frame-ancestors 'none'");
      expect(res.headers['x-content-type-options']).toBe('nosniff');
      expect(res.headers['cross-origin-resource-policy']).toBe('same-origin');
      expect(res.headers['cache-control']).toBe('no-store');
      for (const pageOnly of ['referrer-policy', 'cross-origin-opener-policy', 'origin-agent-cluster', 'x-dns-prefetch-control', 'x-frame-options', 'x-xss-protection']) {
        expect(res.headers[pageOnly], `${path} ${pageOnly}`).toBeUndefined();
      }
      expect(res.headers['x-powered-by']).toBeUndefined();
    }
    // A page keeps the full set.
    const page = await request(t.app).get('/login');
    expect(page.headers['referrer-policy']).toBe('no-referrer');
    expect(page.headers['x-frame-options']).toBe('SAMEORIGIN');
  });

  it('the same headers on two answers in a row (worked out once, copied onto each)', async () => {
    const a = await request(t.app).get('/login');
    const b = await request(t.app).get('/nothing-here');
    expect(b.status).toBe(404);
    expect(b.headers['content-security-policy']).toBe(a.headers['content-security-policy']);
    expect(b.headers['strict-transport-security']).toBe(a.headers['strict-transport-security']);
  });
});
