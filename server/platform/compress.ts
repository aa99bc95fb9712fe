import fs from 'node:fs';
import path from 'node:path';
import zlib from 'node:zlib';
import compression from 'compression';
import expressStaticGzip from 'express-static-gzip';
import type { Request, RequestHandler, Response } from 'express';
import { DOCUMENT_ONLY } from './security';

/**
 * What crosses the wire compressed, and how (README, "Speed", compression):
 * - built files under /static: the brotli or gzip copy written at build time
 *   (scripts/precompress.ts), chosen by Accept-Encoding, with `Vary: Accept-Encoding`;
 * - the capture shell and its service worker: the same copies, kept in memory;
 * - answers made per request (pages, JSON, CSV, SVG): compressed on the fly above 1 KB.
 * PDFs, photos and other binary formats are sent as they are: they are compressed already.
 */

/** Hashed file names (Vite's assets/) never change content: a year, immutable. */
const HASHED = `${path.sep}assets${path.sep}`;

// Headers that only a document acts on (DOCUMENT_ONLY in security.ts) are left off scripts,
// styles, fonts and the web manifest, which are never one: they were a third of each small answer
// on a phone's first visit. HTML and SVG (which can be opened as a page) keep them all; every file
// keeps nosniff and Cross-Origin-Resource-Policy, which do apply to it.
const NEVER_A_DOCUMENT = /\.(?:js|mjs|css|woff2?|webmanifest)(?:\.(?:br|gz))?$/i;

/** The built client under /static, each file as its smallest copy the browser accepts. */
export function staticAssets(root: string): RequestHandler {
  return expressStaticGzip(root, {
    enableBrotli: true,
    orderPreference: ['br', 'gzip'],
    index: false,
    serveStatic: {
      index: false,
      redirect: false,
      setHeaders(res, file) {
        if (file.includes(HASHED)) res.setHeader('Cache-Control', 'public, max-age=31536000, immutable');
        if (NEVER_A_DOCUMENT.test(file)) for (const name of DOCUMENT_ONLY) res.removeHeader(name);
      },
    },
  }) as RequestHandler;
}

export interface Built {
  identity: Buffer;
  br: Buffer | null;
  gzip: Buffer | null;
}

const readIfThere = (file: string) => (fs.existsSync(file) ? fs.readFileSync(file) : null);

/** A built file and its .br/.gz copies, read once. */
export function loadBuilt(file: string): Built {
  return { identity: fs.readFileSync(file), br: readIfThere(`${file}.br`), gzip: readIfThere(`${file}.gz`) };
}

/** The q-value the Accept-Encoding header gives `name` (RFC 9110, 12.5.3): its own entry, else `*`, else 0. */
function qualityOf(header: string, name: string): number {
  let star = 0;
  for (const part of header.split(',')) {
    const [token = '', ...params] = part.trim().split(';'); // split always gives at least one piece
    const q = params.map((p) => /^\s*q=([0-9.]+)\s*$/.exec(p)).find(Boolean);
    const value = q ? Number(q[1]) : 1;
    if (token.trim().toLowerCase() === name) return value;
    if (token.trim() === '*') star = value;
  }
  return star;
}

/**
 * Sends one of a built file's copies by the request's Accept-Encoding (the caller sets Content-Type
 * and Cache-Control): the encoding the browser rates highest, brotli on a tie (browsers send
 * `gzip, deflate, br` all at q=1, and brotli is the smaller). Vary is set whatever is chosen, so a
 * cache never hands brotli to a browser that did not ask for it.
 */
export function sendBuilt(req: Request, res: Response, built: Built) {
  res.vary('Accept-Encoding');
  const header = req.headers['accept-encoding'] ?? '';
  let chosen: 'br' | 'gzip' | null = null;
  let best = 0;
  for (const encoding of ['br', 'gzip'] as const) {
    const q = built[encoding] ? qualityOf(header, encoding) : 0;
    if (q > best) [chosen, best] = [encoding, q];
  }
  if (chosen) {
    res.setHeader('Content-Encoding', chosen);
    res.send(built[chosen]);
    return;
  }
  res.send(built.identity);
}

/** Already compressed, or binary: compressing again costs time and saves nothing. */
const NEVER = /^(?:application\/(?:pdf|zip|gzip|x-gzip|octet-stream|x-7z-compressed|x-bzip2?|x-xz|wasm)|image\/(?!svg\+xml)|audio\/|video\/|font\/woff2?)/i;

/**
 * On-the-fly compression of dynamic answers above 1 KB: text types by the `compression` package's
 * own list (mime-db's compressible flag), never the types above, never an answer marked
 * `Cache-Control: no-transform` (see keepUncompressed). Brotli at quality 4 and a 64 KB window: a
 * few tenths of a millisecond for a page of JSON, and a small buffer per response.
 */
export function compressDynamic(): RequestHandler {
  return compression({
    threshold: 1024,
    filter: (req, res) => {
      const type = String(res.getHeader('Content-Type') ?? '');
      if (NEVER.test(type)) return false;
      return compression.filter(req, res);
    },
    brotli: {
      params: {
        [zlib.constants.BROTLI_PARAM_QUALITY]: 4,
        [zlib.constants.BROTLI_PARAM_LGWIN]: 16,
      },
    },
    level: 6,
    memLevel: 8,
  });
}

/**
 * For a page that shows a secret which stays the same from one answer to the next (a one-time link
 * in the outbox): never compressed, so that a page reflecting what an attacker typed cannot leak it
 * by its compressed length (BREACH). The CSRF token needs no such care: lusca salts it afresh on
 * every answer (README, "Speed").
 */
export const keepUncompressed: RequestHandler = (_req, res, next) => {
  res.setHeader('Cache-Control', 'no-store, no-transform');
  next();
};
