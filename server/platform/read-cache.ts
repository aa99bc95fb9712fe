import zlib from 'node:zlib';
import type { Request, Response } from 'express';

/**
 * List answers kept ready to send, JSON and its compressed copies, for as long as the database
 * has not changed. "Changed" is SQLite's data version as seen by the second, read-only connection
 * (server/platform/fast-reads.ts): it moves on every commit by any other connection, this
 * server's own writes and another process's alike, so the first read after any write computes
 * afresh. The data version is read before computing, so an answer is never labelled newer than
 * the data it was read from.
 *
 * Guards stay where they are: only a route that has already checked the session, the user and
 * the permission asks, and its key holds the organisation id from that user's context (one
 * organisation never gets another's answer). Nothing here depends on the session, so signing out
 * or changing a password ends nothing that is kept. Without a database file (PostgreSQL, the
 * tests' in-memory database) every answer is computed.
 */
export interface ReadCache {
  /** Sends the JSON answer kept under `key`, computing and keeping it first when the data changed. */
  sendJson(req: Request, res: Response, key: string, compute: () => Promise<unknown>): Promise<void>;
}

// The same settings as the compression of dynamic answers (server/platform/compress.ts).
const THRESHOLD = 1024;
const BROTLI = { params: { [zlib.constants.BROTLI_PARAM_QUALITY]: 4, [zlib.constants.BROTLI_PARAM_LGWIN]: 16 } };
const GZIP = { level: 6, memLevel: 8 };

interface Entry {
  json: Buffer;
  br?: Buffer;
  gzip?: Buffer;
}

export function readCache(dataVersion?: () => number, maxEntries = 200): ReadCache {
  if (!dataVersion) {
    return {
      sendJson: async (_req, res, _key, compute) => {
        res.json(await compute());
      },
    };
  }
  const entries = new Map<string, Entry>();
  let keptAt = dataVersion();
  return {
    async sendJson(req, res, key, compute) {
      const version = dataVersion();
      if (version !== keptAt) {
        entries.clear(); // everything kept was read before the change
        keptAt = version;
      }
      let entry = entries.get(key);
      if (!entry) {
        const json = Buffer.from(JSON.stringify(await compute()));
        entry = { json };
        // Not kept when a newer change was seen while computing: it would be kept as current.
        if (keptAt === version) {
          if (entries.size >= maxEntries) entries.delete(entries.keys().next().value as string);
          entries.set(key, entry);
        }
      }
      send(req, res, entry);
    },
  };
}

function send(req: Request, res: Response, entry: Entry) {
  res.setHeader('Content-Type', 'application/json; charset=utf-8');
  let body = entry.json;
  if (body.length >= THRESHOLD) {
    res.vary('Accept-Encoding');
    const encoding = req.acceptsEncodings('br', 'gzip', 'identity');
    if (encoding === 'br') body = entry.br ??= zlib.brotliCompressSync(entry.json, BROTLI);
    else if (encoding === 'gzip') body = entry.gzip ??= zlib.gzipSync(entry.json, GZIP);
    // Already encoded: the compression of dynamic answers leaves it as it is.
    if (encoding === 'br' || encoding === 'gzip') res.setHeader('Content-Encoding', encoding);
  }
  res.setHeader('Content-Length', body.length);
  res.end(body);
}
