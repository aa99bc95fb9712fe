import { randomUUID } from 'node:crypto';
import fs from 'node:fs';
import http from 'node:http';
import type { AddressInfo } from 'node:net';
import os from 'node:os';
import path from 'node:path';
import zlib from 'node:zlib';
import express, { type Express } from 'express';
import { afterAll, afterEach, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { precompressDir } from '../../../scripts/precompress';
import { loadBuilt, sendBuilt, staticAssets } from '../../../server/platform/compress';
import { securityHeaders } from '../../../server/platform/security';
import { CLIENT_DIST, clientIsBuilt } from '../../../server/platform/assets';
import { createTestApp, csrfFromHtml, signInApi, signInPages, type TestApp } from '../../helpers/app';
import { DEMO_ORGANISATIONS } from '../../../seeds/demo-people';
import { todayIso } from '../../../shared/registry/season';

// What crosses the wire (server/platform/compress.ts). Answers are read as raw bytes over a real
// socket (supertest would decode them), then decoded here with node's zlib and compared with the
// identity answer byte for byte.

const BROWSER = 'gzip, deflate, br, zstd'; // what Chromium sends

interface Raw {
  status: number;
  headers: http.IncomingHttpHeaders;
  body: Buffer;
}

function rawGet(app: Express, url: string, headers: Record<string, string> = {}): Promise<Raw> {
  return new Promise((resolve, reject) => {
    const server = app.listen(0, '127.0.0.1', () => {
      const { port } = server.address() as AddressInfo;
      const req = http.get({ host: '127.0.0.1', port, path: url, headers }, (res) => {
        const chunks: Buffer[] = [];
        res.on('data', (c: Buffer) => chunks.push(c));
        res.on('end', () => {
          server.close();
          resolve({ status: res.statusCode!, headers: res.headers, body: Buffer.concat(chunks) });
        });
      });
      req.on('error', (err) => {
        server.close();
        reject(err);
      });
    });
  });
}

function decoded(r: Raw): Buffer {
  const enc = r.headers['content-encoding'];
  if (enc === 'br') return zlib.brotliDecompressSync(r.body);
  if (enc === 'gzip') return zlib.gunzipSync(r.body);
  if (enc === undefined) return r.body;
  throw new Error(`unexpected encoding ${enc}`);
}

const varies = (r: Raw) => String(r.headers.vary ?? '').split(/,\s*/).map((v) => v.toLowerCase()).includes('accept-encoding');

describe('built files under /static', () => {
  let dir: string;
  let app: Express;
  // A build in miniature: a hashed script, an unhashed page, a font and a photo-like binary.
  const script = Buffer.from(`export const rows = ${JSON.stringify(Array.from({ length: 200 }, (_, i) => ({ stop: i + 1, lengthCm: 20 + (i % 17) })))};\n`);
  const page = Buffer.from(`<!doctype html><title>Shell</title>${'<p>Crowntip</p>'.repeat(100)}`);
  const font = Buffer.from('wOF2' + 'x'.repeat(3000)); // woff2 is brotli inside: never copied
  beforeAll(async () => {
    dir = fs.mkdtempSync(path.join(os.tmpdir(), 'crowntip-static-'));
    fs.mkdirSync(path.join(dir, 'assets'));
    fs.writeFileSync(path.join(dir, 'assets/today-Ab12Cd34.js'), script);
    fs.writeFileSync(path.join(dir, 'index.html'), page);
    fs.writeFileSync(path.join(dir, 'assets/lato-Zz99.woff2'), font);
    await precompressDir(dir);
    app = express().use(securityHeaders(false)).use('/static', staticAssets(dir));
  });
  afterAll(() => fs.rmSync(dir, { recursive: true, force: true }));

  it('sends the brotli copy to a browser that accepts it, typed as the original, cached a year, varying by encoding', async () => {
    const r = await rawGet(app, '/static/assets/today-Ab12Cd34.js', { 'accept-encoding': BROWSER });
    expect(r.status).toBe(200);
    expect(r.headers['content-encoding']).toBe('br');
    expect(varies(r)).toBe(true);
    expect(r.headers['content-type']).toMatch(/^(text|application)\/javascript; charset=utf-8$/i);
    expect(r.headers['cache-control']).toBe('public, max-age=31536000, immutable');
    expect(Number(r.headers['content-length'])).toBe(fs.statSync(path.join(dir, 'assets/today-Ab12Cd34.js.br')).size);
    expect(r.body.length).toBeLessThan(script.length / 3);
    expect(decoded(r).equals(script)).toBe(true);
  });

  it('sends gzip when only gzip is accepted (or brotli is refused with q=0), and the file itself otherwise', async () => {
    for (const accept of ['gzip', 'br;q=0, gzip']) {
      const r = await rawGet(app, '/static/assets/today-Ab12Cd34.js', { 'accept-encoding': accept });
      expect(r.headers['content-encoding'], accept).toBe('gzip');
      expect(decoded(r).equals(script)).toBe(true);
    }
    const plain = await rawGet(app, '/static/assets/today-Ab12Cd34.js');
    expect(plain.headers['content-encoding']).toBeUndefined();
    expect(varies(plain)).toBe(true); // a shared cache must still tell the two apart
    expect(plain.body.equals(script)).toBe(true);
  });

  it('an unhashed file is not cached for a year; a font goes as it is, with no Vary', async () => {
    const html = await rawGet(app, '/static/index.html', { 'accept-encoding': BROWSER });
    expect(html.headers['content-encoding']).toBe('br');
    expect(html.headers['content-type']).toMatch(/^text\/html; charset=utf-8$/i);
    expect(html.headers['cache-control']).not.toContain('immutable');
    expect(decoded(html).equals(page)).toBe(true);

    const woff2 = await rawGet(app, '/static/assets/lato-Zz99.woff2', { 'accept-encoding': BROWSER });
    expect(woff2.headers['content-encoding']).toBeUndefined();
    expect(woff2.headers['content-type']).toBe('font/woff2');
    expect(woff2.body.equals(font)).toBe(true);
  });

  it('a script or font carries nosniff and its resource policy but not the headers only a page acts on; a page keeps them all', async () => {
    for (const file of ['assets/today-Ab12Cd34.js', 'assets/lato-Zz99.woff2']) {
      const r = await rawGet(app, `/static/${file}`, { 'accept-encoding': BROWSER });
      expect(r.headers['x-content-type-options'], file).toBe('nosniff');
      expect(r.headers['cross-origin-resource-policy']).toBe('same-origin');
      for (const name of ['content-security-policy', 'x-frame-options', 'strict-transport-security', 'referrer-policy', 'cross-origin-opener-policy']) {
        expect(r.headers[name], `${file} ${name}`).toBeUndefined();
      }
    }
    const html = await rawGet(app, '/static/index.html', { 'accept-encoding': BROWSER });
    expect(html.headers['content-security-policy']).toContain("script-src 'self'");
    expect(html.headers['x-frame-options']).toBe('SAMEORIGIN');
  });

  it('sendBuilt picks the same way for the shell and the service worker, read once from disk', async () => {
    const built = loadBuilt(path.join(dir, 'index.html'));
    const one = express().get('/shell', (req, res) => sendBuilt(req, res.type('html'), built));
    const br = await rawGet(one, '/shell', { 'accept-encoding': BROWSER });
    expect(br.headers['content-encoding']).toBe('br');
    expect(varies(br)).toBe(true);
    expect(decoded(br).equals(page)).toBe(true);
    const gz = await rawGet(one, '/shell', { 'accept-encoding': 'gzip;q=1, br;q=0.5' }); // the browser's order counts
    expect(gz.headers['content-encoding']).toBe('gzip');
    expect(decoded(gz).equals(page)).toBe(true);
    const plain = await rawGet(one, '/shell', { 'accept-encoding': 'identity' });
    expect(plain.headers['content-encoding']).toBeUndefined();
    expect(plain.body.equals(page)).toBe(true);
  });
});

describe('answers made per request', () => {
  let t: TestApp;
  let cookie: string;
  beforeEach(async () => {
    t = await createTestApp();
    const { agent } = await signInApi(t.app, 'admin@crowntip.test');
    // The signed-in cookie, for the raw requests below.
    const jar = agent.jar.getCookies({ domain: '127.0.0.1', path: '/', secure: false, script: false });
    cookie = jar.map((c) => `${c.name}=${c.value}`).join('; ');
  });
  afterEach(async () => {
    await t.close();
  });

  const get = (url: string, accept?: string) => rawGet(t.app, url, { cookie, ...(accept ? { 'accept-encoding': accept } : {}) });

  it('JSON above 1 KB goes as brotli or gzip (as accepted), with Vary, and decodes to the same bytes', async () => {
    const plain = await get('/api/fields?limit=50', 'identity');
    expect(plain.status).toBe(200);
    expect(plain.body.length).toBeGreaterThan(1024);
    expect(plain.headers['content-encoding']).toBeUndefined();
    for (const [accept, enc] of [
      [BROWSER, 'br'],
      ['gzip', 'gzip'],
    ]) {
      const r = await get('/api/fields?limit=50', accept);
      expect(r.headers['content-encoding'], accept).toBe(enc);
      expect(varies(r)).toBe(true);
      expect(r.headers['content-type']).toBe('application/json; charset=utf-8');
      expect(r.body.length).toBeLessThan(plain.body.length / 2);
      expect(decoded(r).equals(plain.body)).toBe(true);
    }
  });

  it('an office page and a CSV download are compressed; a small JSON answer (under 1 KB) is not', async () => {
    const page = await get('/registry/ranches', BROWSER);
    expect(page.status).toBe(200);
    expect(page.headers['content-type']).toMatch(/^text\/html/);
    expect(page.headers['content-encoding']).toBe('br');
    expect(decoded(page).toString('utf8')).toContain('</html>');

    const csvPlain = await get('/registry/season.csv', 'identity');
    expect(csvPlain.status).toBe(200);
    expect(csvPlain.headers['content-type']).toBe('text/csv; charset=utf-8');
    expect(csvPlain.body.length).toBeGreaterThan(1024);
    const csv = await get('/registry/season.csv', 'gzip');
    expect(csv.headers['content-encoding']).toBe('gzip');
    expect(decoded(csv).equals(csvPlain.body)).toBe(true);

    const small = await get('/api/session', BROWSER);
    expect(small.status).toBe(200);
    expect(small.body.length).toBeLessThan(1024);
    expect(small.headers['content-encoding']).toBeUndefined();
  });

  it('a PDF and a photo go as they are, even to a browser accepting brotli', async () => {
    const ranch = await t.db('ranches').where('organisation_id', DEMO_ORGANISATIONS[0].id).first('id');
    const agent = await signInApi(t.app, 'admin@crowntip.test');
    const final = await agent.agent.post('/api/registers').set('X-CSRF-Token', agent.csrf).send({ ranchId: ranch.id, year: 2026 });
    expect(final.status, JSON.stringify(final.body)).toBe(201);
    const pdf = await get(`/api/registers/${final.body.id}.pdf`, BROWSER);
    expect(pdf.status).toBe(200);
    expect(pdf.headers['content-type']).toBe('application/pdf');
    expect(pdf.body.length).toBeGreaterThan(1024);
    expect(pdf.headers['content-encoding']).toBeUndefined();
    expect(pdf.body.subarray(0, 5).toString()).toBe('%PDF-');

    // A JPEG padded with zeros after its end marker: highly compressible bytes, still sent as they are.
    const jpeg = Buffer.concat([
      Buffer.from(
        '/9j/4AAQSkZJRgABAQAAAQABAAD/2wBDAAEBAQEBAQEBAQEBAQEBAQEBAQEBAQEBAQEBAQEBAQEBAQEBAQEBAQEBAQEBAQEBAQEBAQEBAQEBAQEBAQEBAQH/wAALCAAIAAgBAREA/8QAFAABAAAAAAAAAAAAAAAAAAAAAP/EABQQAQAAAAAAAAAAAAAAAAAAAAD/2gAIAQEAAD8AP//Z',
        'base64',
      ),
      Buffer.alloc(8000),
    ]);
    const sampler = await signInApi(t.app, 'sampler@crowntip.test');
    const today = await sampler.agent.get('/api/today');
    const plantingId = today.body.items[0].plantingId as string;
    const walk = await sampler.agent
      .post('/api/walks')
      .set('X-CSRF-Token', sampler.csrf)
      .send({ id: randomUUID(), plantingId, walkedOn: todayIso(), stage: 'Z31', plants: [20, 24, 22].map((lengthCm, i) => ({ stop: i + 1, lengthCm })) });
    expect(walk.status, JSON.stringify(walk.body)).toBe(201);
    const up = await sampler.agent.post(`/api/walks/${walk.body.id}/photos`).set('X-CSRF-Token', sampler.csrf).field('stop', '1').attach('photo', jpeg, 'stop.jpg');
    expect(up.status, JSON.stringify(up.body)).toBe(201);
    const photo = await get(up.body.url, BROWSER);
    expect(photo.status).toBe(200);
    expect(photo.headers['content-type']).toBe('image/jpeg');
    expect(photo.headers['content-encoding']).toBeUndefined();
    expect(photo.body.equals(jpeg)).toBe(true);
  });

  it.skipIf(!clientIsBuilt())('the capture shell and its service worker go as their brotli copies from the build', async () => {
    for (const [url, type] of [
      ['/capture', /^text\/html/],
      ['/capture/sw.js', /^application\/javascript/],
    ] as const) {
      const r = await get(url, BROWSER);
      expect(r.status, url).toBe(200);
      expect(r.headers['content-type']).toMatch(type);
      expect(r.headers['content-encoding']).toBe('br');
      expect(varies(r)).toBe(true);
      expect(decoded(r).equals((await get(url, 'identity')).body)).toBe(true);
      if (url === '/capture/sw.js') expect(decoded(r).equals(fs.readFileSync(path.join(CLIENT_DIST, 'sw.js')))).toBe(true);
    }
    expect((await get('/capture/sw.js', BROWSER)).headers['service-worker-allowed']).toBe('/capture');
  });

  it('the outbox page of a message with a live one-time link is never compressed (BREACH)', async () => {
    // An invitation puts a live sign-in link in the captured message (no mail server in tests).
    const pages = await signInPages(t.app, 'admin@crowntip.test');
    const form = await pages.get('/admin/users/invite');
    const sent = await pages
      .post('/admin/users/invite')
      .type('form')
      .send({ _csrf: csrfFromHtml(form.text), name: 'Orla Fenwick', email: 'orla@crowntip.test', role: 'sampler' });
    expect(sent.status).toBe(302);
    const message = await t.db('mail_outbox').where('to_address', 'orla@crowntip.test').first('id');
    const r = await get(`/admin/outbox/${message.id}`, BROWSER);
    expect(r.status).toBe(200);
    expect(r.body.length).toBeGreaterThan(1024);
    expect(r.headers['content-encoding']).toBeUndefined();
    expect(r.headers['cache-control']).toBe('no-store, no-transform');
    // The outbox list beside it is compressed as usual.
    expect((await get('/admin/outbox', BROWSER)).headers['content-encoding']).toBe('br');
  });
});
