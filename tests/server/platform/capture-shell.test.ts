import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import zlib from 'node:zlib';
import { afterAll, describe, expect, it } from 'vitest';
import { captureShells } from '../../../server/platform/capture-shell';
import { clientIsBuilt } from '../../../server/platform/assets';
import { createTestApp, signInApi } from '../../helpers/app';

// The capture shell as sent (server/platform/capture-shell.ts): the sampler's language and what
// the first screen needs, announced before any script runs, so the browser fetches them at once.

const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'crowntip-shell-'));
afterAll(() => fs.rmSync(dir, { recursive: true, force: true }));
// A build in miniature: the shell as Vite writes it, and a manifest naming both language chunks.
fs.mkdirSync(path.join(dir, '.vite'));
fs.writeFileSync(
  path.join(dir, 'index.html'),
  '<!doctype html>\n<html lang="en">\n  <head>\n    <title>Capture</title>\n    <script type="module" crossorigin src="/static/assets/capture-A1.js"></script>\n  </head>\n  <body><div id="root"></div></body>\n</html>\n',
);
fs.writeFileSync(
  path.join(dir, '.vite/manifest.json'),
  JSON.stringify({ 'locales/en.ts': { file: 'assets/en-E1.js', src: 'locales/en.ts' }, 'locales/es.ts': { file: 'assets/es-S1.js', src: 'locales/es.ts' } }),
);
const shells = captureShells(dir);
const text = (lng: 'en' | 'es', today: boolean) => shells(lng, today).identity.toString('utf8');
const head = (html: string) => html.slice(0, html.indexOf('</head>'));

describe('the capture shell', () => {
  it('loads only the language in use, and says which it is on <html>', () => {
    const es = text('es', true);
    expect(es).toContain('<html lang="es-MX" data-language="es">');
    expect(head(es)).toContain('<link rel="modulepreload" crossorigin href="/static/assets/es-S1.js">');
    expect(es).not.toContain('en-E1.js');
    const en = text('en', true);
    expect(en).toContain('<html lang="en-US" data-language="en">');
    expect(head(en)).toContain('/static/assets/en-E1.js');
    expect(en).not.toContain('es-S1.js');
  });

  it('preloads the session everywhere and Today’s list only on Today, as the app asks for them', () => {
    expect(head(text('en', true))).toContain('<link rel="preload" as="fetch" crossorigin href="/api/session">');
    expect(head(text('en', true))).toContain('<link rel="preload" as="fetch" crossorigin href="/api/today?limit=500">');
    expect(text('en', false)).toContain('href="/api/session"');
    expect(text('en', false)).not.toContain('/api/today');
    // The same addresses the app fetches (client/lib/api.ts, client/features/today/api.ts).
    expect(fs.readFileSync('client/features/today/api.ts', 'utf8')).toContain("'/api/today?limit=500'");
    expect(fs.readFileSync('client/lib/api.ts', 'utf8')).toContain("SESSION_PATH = '/api/session'");
  });

  it('keeps the rest of the page as built, and its brotli and gzip copies decode to it', () => {
    const built = shells('es', true);
    const html = built.identity.toString('utf8');
    expect(html).toContain('<script type="module" crossorigin src="/static/assets/capture-A1.js"></script>');
    expect(html).toMatch(/<\/head>\n  <body><div id="root"><\/div><\/body>/);
    expect(zlib.brotliDecompressSync(built.br!).equals(built.identity)).toBe(true);
    expect(zlib.gunzipSync(built.gzip!).equals(built.identity)).toBe(true);
    expect(shells('es', true)).toBe(built); // made once
  });

  it.skipIf(!clientIsBuilt())('is what /capture sends the demo sampler (Spanish) from the real build', async () => {
    const t = await createTestApp();
    try {
      const { agent } = await signInApi(t.app, 'sampler@crowntip.test');
      const today = await agent.get('/capture');
      expect(today.status).toBe(200);
      expect(today.text).toContain('data-language="es"');
      expect(today.text).toMatch(/<link rel="modulepreload" crossorigin href="\/static\/assets\/es-[\w-]+\.js">/);
      expect(today.text).not.toMatch(/assets\/en-[\w-]+\.js/);
      expect(today.text).toContain('href="/api/today?limit=500"');
      const guide = await agent.get('/capture/guide');
      expect(guide.text).not.toContain('/api/today');
    } finally {
      await t.close();
    }
  });
});
