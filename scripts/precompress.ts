/*
 * Pre-compression of the built client: after `vite build`, every compressible file in client/dist
 * gets a brotli (`.br`, quality 11) and a gzip (`.gz`, level 9) sibling, so the server can send the
 * smallest encoding the browser accepts without compressing on each request. Registered in
 * vite.config.ts; it runs after the service worker is written (workbox's globs never see these
 * files, and sw.js gets its siblings too).
 */
import fs from 'node:fs';
import path from 'node:path';
import zlib from 'node:zlib';
import { promisify } from 'node:util';
import type { Plugin } from 'vite';

const brotli = promisify(zlib.brotliCompress);
const gzip = promisify(zlib.gzip);

/** Text formats worth compressing; fonts (woff2 is brotli inside) and images are already compressed. */
export const COMPRESSIBLE = /\.(?:js|mjs|css|html|svg|webmanifest|json)$/i;

export interface PrecompressedFile {
  file: string;
  raw: number;
  br: number | null;
  gz: number | null;
}

/** Files under `dir`, leaving out dot-folders (Vite's .vite/manifest.json is read by the server, never sent). */
function listFiles(dir: string): string[] {
  return fs
    .readdirSync(dir, { withFileTypes: true, recursive: true })
    .filter((d) => d.isFile())
    .map((d) => path.join(d.parentPath, d.name))
    .filter((f) => !path.relative(dir, f).split(path.sep).some((part) => part.startsWith('.')));
}

/**
 * Writes `<file>.br` and `<file>.gz` beside each compressible file under `dir`. A sibling that would
 * not be smaller than the original is not written (and an older one is removed), so a server that
 * prefers the sibling never sends more bytes than the file itself.
 */
export async function precompressDir(dir: string): Promise<PrecompressedFile[]> {
  const files = listFiles(dir).filter((f) => COMPRESSIBLE.test(f));
  return Promise.all(
    files.map(async (file) => {
      const raw = await fs.promises.readFile(file);
      const [br, gz] = await Promise.all([
        brotli(raw, {
          params: {
            [zlib.constants.BROTLI_PARAM_QUALITY]: zlib.constants.BROTLI_MAX_QUALITY,
            [zlib.constants.BROTLI_PARAM_MODE]: zlib.constants.BROTLI_MODE_TEXT,
            [zlib.constants.BROTLI_PARAM_SIZE_HINT]: raw.length,
          },
        }),
        gzip(raw, { level: zlib.constants.Z_BEST_COMPRESSION }),
      ]);
      const write = async (suffix: string, data: Buffer) => {
        const target = file + suffix;
        if (data.length < raw.length) {
          await fs.promises.writeFile(target, data);
          return data.length;
        }
        await fs.promises.rm(target, { force: true });
        return null;
      };
      return { file: path.relative(dir, file), raw: raw.length, br: await write('.br', br), gz: await write('.gz', gz) };
    }),
  );
}

/** Vite plugin: pre-compresses the build output once everything else (the service worker too) is written. */
export function precompress(): Plugin {
  let outDir = '';
  return {
    name: 'crowntip-precompress',
    apply: 'build',
    configResolved(config) {
      outDir = path.resolve(config.root, config.build.outDir);
    },
    closeBundle: {
      sequential: true,
      order: 'post',
      async handler() {
        if (!fs.existsSync(outDir)) return;
        await precompressDir(outDir);
      },
    },
  };
}
