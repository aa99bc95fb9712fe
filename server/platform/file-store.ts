import { randomBytes } from 'node:crypto';
import { createWriteStream } from 'node:fs';
import fs from 'node:fs/promises';
import path from 'node:path';
import type { Readable, Writable } from 'node:stream';
import { pipeline } from 'node:stream/promises';
import { HttpError } from './errors';

/**
 * Writing uploaded files to disk so that a full or read-only disk never leaves half a file behind
 * (used by the disk store in server/platform/object-store.ts): bytes go to a temporary name beside
 * the target, are flushed, then renamed into place; on any error the temporary file is removed and
 * the error becomes a 507 (disk full) or 503 (storage unavailable) with plain words.
 */

/** How a file is opened for writing; tests swap this for a stream that fails like a full disk. */
export const fileSystem = {
  openWrite(file: string, mode: number): Writable {
    return createWriteStream(file, { mode, flags: 'wx' });
  },
};

const FULL = new Set(['ENOSPC', 'EDQUOT', 'EFBIG']);
const UNAVAILABLE = new Set(['EROFS', 'EACCES', 'EPERM', 'EIO', 'ENOTDIR', 'EMFILE', 'ENFILE', 'EBUSY']);

/** A disk error as the answer the user sees; anything else is passed on unchanged. */
export function storageError(err: unknown, what = 'the file'): unknown {
  const code = (err as { code?: string })?.code;
  if (code && FULL.has(code)) {
    return new HttpError('storage_full', `The server's disk is full, so ${what} was not saved. Nothing was kept; ask your administrator to free space, then send it again.`);
  }
  if (code && UNAVAILABLE.has(code)) {
    return new HttpError('storage_unavailable', `The server cannot write to its storage just now, so ${what} was not saved. Nothing was kept; ask your administrator, then send it again.`);
  }
  return err;
}

/** A temporary name beside `target` (same folder, so the rename stays on one disk). */
export function temporaryName(target: string): string {
  return path.join(path.dirname(target), `.${path.basename(target)}.${randomBytes(6).toString('hex')}.tmp`);
}

/** Writes `data` to `file` (created, never overwritten) and waits until it is on disk; removes it on error. */
export async function writeNewFile(file: string, data: Buffer, mode = 0o640): Promise<void> {
  try {
    await new Promise<void>((resolve, reject) => {
      const out = fileSystem.openWrite(file, mode);
      out.once('error', reject);
      out.once('finish', () => resolve());
      out.end(data);
    });
  } catch (err) {
    await fs.rm(file, { force: true }).catch(() => undefined);
    throw err;
  }
}

/** Writes a stream to `file` (created, never overwritten) until it is all on disk; removes it on error. */
export async function writeNewStream(file: string, data: Readable, mode = 0o640): Promise<void> {
  try {
    await pipeline(data, fileSystem.openWrite(file, mode));
  } catch (err) {
    await fs.rm(file, { force: true }).catch(() => undefined);
    throw err;
  }
}

/** Removes files, ignoring those already gone. */
export async function discard(...files: string[]): Promise<void> {
  await Promise.all(files.map((f) => fs.rm(f, { force: true }).catch(() => undefined)));
}
