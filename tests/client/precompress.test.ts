import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import zlib from 'node:zlib';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { precompressDir } from '../../scripts/precompress';

// The build step that writes .br and .gz beside client/dist's text files (scripts/precompress.ts).
describe('precompressDir', () => {
  let dir: string;
  const text = (n: number) => Array.from({ length: n }, (_, i) => `const stop${i} = { lengthCm: ${i % 40}, note: "walk" };\n`).join('');
  const files: Record<string, Buffer> = {};
  const put = (rel: string, data: Buffer) => {
    fs.mkdirSync(path.dirname(path.join(dir, rel)), { recursive: true });
    fs.writeFileSync(path.join(dir, rel), data);
    files[rel] = data;
  };
  const exists = (rel: string) => fs.existsSync(path.join(dir, rel));

  beforeEach(() => {
    dir = fs.mkdtempSync(path.join(os.tmpdir(), 'crowntip-precompress-'));
    put('index.html', Buffer.from(`<!doctype html><html><body>${'<p>Today</p>'.repeat(200)}</body></html>`));
    put('assets/capture-abc.js', Buffer.from(text(300)));
    put('assets/capture-abc.css', Buffer.from('.btn{color:#23201a;padding:4px}\n'.repeat(100)));
    put('manifest.webmanifest', Buffer.from(JSON.stringify({ name: 'Capture', icons: Array(30).fill({ src: 'icon.svg' }) })));
    put('assets/tiny.svg', Buffer.from('<svg/>')); // too small: compressing makes it larger
    // Already-compressed formats: random bytes stand in for them (they would not shrink either way).
    put('assets/lato.woff2', Buffer.from(Array.from({ length: 4000 }, (_, i) => (i * 7919) % 256)));
    put('assets/photo.png', Buffer.from(text(50)));
    put('.vite/manifest.json', Buffer.from(JSON.stringify({ entries: Array(50).fill('index.html') })));
  });
  afterEach(() => fs.rmSync(dir, { recursive: true, force: true }));

  it('writes brotli and gzip siblings that decompress to the original bytes', async () => {
    await precompressDir(dir);
    for (const rel of ['index.html', 'assets/capture-abc.js', 'assets/capture-abc.css', 'manifest.webmanifest']) {
      const br = fs.readFileSync(path.join(dir, `${rel}.br`));
      const gz = fs.readFileSync(path.join(dir, `${rel}.gz`));
      const original = files[rel];
      if (!original) throw new Error(`${rel} was not written before the build step ran`);
      expect(zlib.brotliDecompressSync(br).equals(original), rel).toBe(true);
      expect(zlib.gunzipSync(gz).equals(original), rel).toBe(true);
      expect(br.length).toBeLessThan(original.length);
      // brotli at its top quality beats gzip on repetitive text (common practice, no published source).
      expect(br.length).toBeLessThanOrEqual(gz.length);
    }
  });

  it('writes gzip at maximum compression (RFC 1952, 2.3.1: XFL = 2 means "maximum compression")', async () => {
    await precompressDir(dir);
    const gz = fs.readFileSync(path.join(dir, 'assets/capture-abc.js.gz'));
    expect([gz[0], gz[1]]).toEqual([0x1f, 0x8b]); // gzip magic
    expect(gz[8]).toBe(2);
  });

  it('leaves fonts, images, Vite metadata and files that would not shrink alone', async () => {
    const listed = await precompressDir(dir);
    for (const rel of ['assets/lato.woff2', 'assets/photo.png', '.vite/manifest.json', 'assets/tiny.svg']) {
      expect(exists(`${rel}.br`), rel).toBe(false);
      expect(exists(`${rel}.gz`), rel).toBe(false);
    }
    expect(listed.find((f) => f.file === path.join('assets', 'tiny.svg'))).toMatchObject({ br: null, gz: null });
    expect(listed.map((f) => f.file).sort()).toEqual(
      ['index.html', 'manifest.webmanifest', 'assets/capture-abc.js', 'assets/capture-abc.css', 'assets/tiny.svg'].map((f) => path.join(f)).sort(),
    );
  });

  it('running twice compresses the originals, not the siblings', async () => {
    await precompressDir(dir);
    await precompressDir(dir);
    expect(exists('assets/capture-abc.js.br.br')).toBe(false);
    expect(exists('assets/capture-abc.js.gz.gz')).toBe(false);
  });
});
