import fs from 'node:fs';
import path from 'node:path';
import zlib from 'node:zlib';
import { CLIENT_DIST } from './assets';
import type { Built } from './compress';

export type ShellLanguage = 'en' | 'es';

/**
 * The built capture shell (client/dist/index.html) told, before any script runs, what the first
 * screen will need, so that the browser fetches it all at once instead of one thing after another
 * on a slow link:
 * - the text of the sampler's own language (only that one), as a module preload, and the language
 *   on <html data-language>, which client/lib/i18n.ts reads when the phone has no choice kept;
 * - the signed-in session and, at /capture itself, Today's list, as fetch preloads, which the
 *   app's own requests of the same addresses then take (client/lib/api.ts, features/today/api.ts).
 * Nothing in it is private: the data arrives by the preloaded requests, each checked as usual.
 * Each variant is made and compressed once (a few hundred bytes).
 */
export const TODAY_PATH = '/api/today?limit=500';
export const SESSION_PATH = '/api/session';

interface ManifestEntry {
  file: string;
  src?: string;
}

export function captureShells(dist = CLIENT_DIST) {
  const source = fs.readFileSync(path.join(dist, 'index.html'), 'utf8');
  let manifest: Record<string, ManifestEntry> = {};
  try {
    manifest = JSON.parse(fs.readFileSync(path.join(dist, '.vite/manifest.json'), 'utf8')) as Record<string, ManifestEntry>;
  } catch {
    // no manifest: the shell goes without the language preload
  }
  const languageChunk = (lng: ShellLanguage) => manifest[`locales/${lng}.ts`]?.file;
  const made = new Map<string, Built>();

  return (language: ShellLanguage, today: boolean): Built => {
    const key = `${language}:${today}`;
    const done = made.get(key);
    if (done) return done;
    const chunk = languageChunk(language);
    const hints = [
      chunk ? `<link rel="modulepreload" crossorigin href="/static/${chunk}">` : '',
      `<link rel="preload" as="fetch" crossorigin href="${SESSION_PATH}">`,
      today ? `<link rel="preload" as="fetch" crossorigin href="${TODAY_PATH}">` : '',
    ].filter(Boolean);
    const html = source
      .replace(/<html lang="[^"]*"/, `<html lang="${language === 'es' ? 'es-MX' : 'en-US'}" data-language="${language}"`)
      .replace('</head>', `${hints.map((h) => `  ${h}\n`).join('')}</head>`);
    const identity = Buffer.from(html);
    const built: Built = {
      identity,
      br: zlib.brotliCompressSync(identity, { params: { [zlib.constants.BROTLI_PARAM_QUALITY]: 11, [zlib.constants.BROTLI_PARAM_MODE]: zlib.constants.BROTLI_MODE_TEXT } }),
      gzip: zlib.gzipSync(identity, { level: 9 }),
    };
    made.set(key, built);
    return built;
  };
}
