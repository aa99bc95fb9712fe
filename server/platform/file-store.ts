import { randomBytes } from 'node:crypto';
import { createWriteStream } from 'node:fs';
import fs from 'node:fs/promises';
import path from 'node:path';
import type { Writable } from 'node:stream';
import { HttpError } from './errors';

/**
 * Writing uploaded files so that a full or read-only disk never leaves half a file behind: bytes go
 * to a temporary name beside the target, are flushed, then renamed into place; on any error the
 * temporary file is removed and the error becomes a 507 (disk full) or 503 (storage unavailable)
 * with plain words.
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

/**
 * Makes the folder of `target`, writes `data` under a temporary name and returns it; the caller
 * renames it into place (after its database row is written) or calls `discard`.
 */
export async function stageFile(target: string, data: Buffer, what: string, mode = 0o640): Promise<string> {
  const tmp = temporaryName(target);
  try {
    await fs.mkdir(path.dirname(target), { recursive: true });
    await writeNewFile(tmp, data, mode);
  } catch (err) {
    throw storageError(err, what);
  }
  return tmp;
}

/** Renames a staged file into place; on error removes it and answers 507/503. */
export async function commitFile(tmp: string, target: string, what: string): Promise<void> {
  try {
    await fs.rename(tmp, target);
  } catch (err) {
    await discard(tmp);
    throw storageError(err, what);
  }
}

/** Removes files, ignoring those already gone. */
export async function discard(...files: string[]): Promise<void> {
  await Promise.all(files.map((f) => fs.rm(f, { force: true }).catch(() => undefined)));
}

/** Stage and rename in one step, for files without a database row. */
export async function writeFileAtomic(target: string, data: Buffer, what: string, mode = 0o640): Promise<void> {
  const tmp = await stageFile(target, data, what, mode);
  await commitFile(tmp, target, what);
}
