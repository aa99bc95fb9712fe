import { createReadStream } from 'node:fs';
import fs from 'node:fs/promises';
import path from 'node:path';
import type { Readable } from 'node:stream';
import { HttpError } from './errors';
import { discard, storageError, temporaryName, writeNewFile, writeNewStream } from './file-store';

/**
 * Where uploaded files (photos, registry import files) are kept: one interface over the server's
 * own disk (the default) and any S3-compatible store (when S3_BUCKET is set), so that several app
 * servers see the same files. Keys are relative paths such as `photos/<org>/<walk>/<name>.jpg`;
 * the same key names the same file on either store, so a disk folder copied into a bucket keeps
 * working. Nothing here is public: files are served through the app after its permission check.
 */
export interface StoredObject {
  body: Readable;
  size: number;
}

export interface ObjectStore {
  /** "disk" or "s3", with where (for the start line and /readyz). */
  readonly kind: 'disk' | 's3';
  readonly where: string;
  /**
   * Stores `data` under `key`, replacing what was there; a reader sees the old file or the whole
   * new one, never part of it. Fails with 507 `storage_full` or 503 `storage_unavailable` (plain
   * words naming `what`) and keeps nothing.
   */
  put(key: string, data: Buffer | Readable, opts: { what: string; contentType?: string }): Promise<void>;
  /** The file, or null when there is none; 503 when the store cannot be read. */
  get(key: string, what?: string): Promise<StoredObject | null>;
  /** Removes the file; no error when it is already gone. */
  delete(key: string): Promise<void>;
  exists(key: string): Promise<boolean>;
  /** Keys under `prefix` (which ends in "/") with their last change. */
  list(prefix: string): Promise<{ key: string; modified: Date }[]>;
  /** Resolves when the store can be written now; rejects with a short reason otherwise. */
  health(): Promise<void>;
}

const KEY = /^[A-Za-z0-9_-][A-Za-z0-9._-]*(\/[A-Za-z0-9_-][A-Za-z0-9._-]*)*$/;

/** Refuses keys that could leave the store's folder or prefix ("..", absolute paths, odd characters). */
export function checkKey(key: string): string {
  if (!KEY.test(key) || key.split('/').some((part) => part === '..' || part === '.')) throw new HttpError('not_found');
  return key;
}

/** Reads a whole object (small files only: import sidecars and CSVs within the upload limit). */
export async function readAll(obj: StoredObject): Promise<Buffer> {
  const chunks: Buffer[] = [];
  for await (const chunk of obj.body) chunks.push(Buffer.isBuffer(chunk) ? chunk : Buffer.from(chunk as Uint8Array));
  return Buffer.concat(chunks);
}

const MISSING = new Set(['ENOENT', 'ENOTDIR', 'EISDIR']);

/** Files under one folder (UPLOADS_DIR), written atomically through server/platform/file-store.ts. */
export class DiskStore implements ObjectStore {
  readonly kind = 'disk' as const;
  readonly root: string;
  constructor(root: string) {
    this.root = path.resolve(root);
  }
  get where() {
    return this.root;
  }

  private pathOf(key: string): string {
    return path.join(this.root, ...checkKey(key).split('/'));
  }

  async put(key: string, data: Buffer | Readable, { what }: { what: string }): Promise<void> {
    const target = this.pathOf(key);
    const tmp = temporaryName(target);
    try {
      await fs.mkdir(path.dirname(target), { recursive: true });
      if (Buffer.isBuffer(data)) await writeNewFile(tmp, data, 0o640);
      else await writeNewStream(tmp, data, 0o640);
      await fs.rename(tmp, target);
    } catch (err) {
      await discard(tmp);
      throw storageError(err, what);
    }
  }

  async get(key: string, what = 'the file'): Promise<StoredObject | null> {
    const file = this.pathOf(key);
    try {
      const stat = await fs.stat(file);
      if (!stat.isFile()) return null;
      return { body: createReadStream(file), size: stat.size };
    } catch (err) {
      if (MISSING.has((err as { code?: string }).code ?? '')) return null;
      throw readError(err, what);
    }
  }

  async delete(key: string): Promise<void> {
    await fs.rm(this.pathOf(key), { force: true });
  }

  async exists(key: string): Promise<boolean> {
    return fs.stat(this.pathOf(key)).then((s) => s.isFile(), () => false);
  }

  async list(prefix: string): Promise<{ key: string; modified: Date }[]> {
    const dir = this.pathOf(prefix.replace(/\/$/, ''));
    let names: string[];
    try {
      names = (await fs.readdir(dir, { recursive: true })) as string[];
    } catch {
      return [];
    }
    const out: { key: string; modified: Date }[] = [];
    for (const name of names) {
      const stat = await fs.stat(path.join(dir, name)).catch(() => null);
      if (stat?.isFile() && !path.basename(name).startsWith('.')) out.push({ key: `${prefix}${name.split(path.sep).join('/')}`, modified: stat.mtime });
    }
    return out;
  }

  async health(): Promise<void> {
    await fs.access(this.root, fs.constants.W_OK).catch((err: NodeJS.ErrnoException) => {
      throw new Error(`the uploads folder cannot be written (${err.code ?? err.message})`);
    });
  }
}

/** A failed read as the answer the user sees (503 in plain words); the cause stays for the log. */
export function readError(err: unknown, what: string): HttpError {
  const e = new HttpError('storage_unavailable', `The server cannot read ${what} from its storage just now. Try again in a moment; if it goes on, tell your administrator.`);
  (e as Error).cause = err;
  return e;
}
