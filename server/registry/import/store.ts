import { randomBytes } from 'node:crypto';
import type { ObjectStore } from '../../platform/object-store';
import { readAll } from '../../platform/object-store';
import { Mapping } from './columns';
import { ImportResult } from './write';

// 6. Uploads kept between preview and commit ------------------------------------------------

export interface ImportMeta {
  id: string;
  organisationId: string;
  userId: string;
  userName: string;
  fileName: string;
  bytes: number;
  uploadedAt: string;
  /** "imported" is final: a second commit of the same upload answers with this result. */
  status: 'uploaded' | 'importing' | 'imported';
  mapping?: Mapping;
  result?: ImportResult;
}

const ID_PATTERN = /^[a-f0-9]{32}$/;
export const isImportId = (id: string) => ID_PATTERN.test(id);

/**
 * Uploaded files in the file store under imports/: `<id>.csv` and a `<id>.json` sidecar naming
 * the organisation, the uploader and the status, so that any server can preview and commit an
 * upload made through another. The id is 128 random bits; every read checks the organisation, so
 * another organisation's id answers as if it did not exist.
 */
export class ImportStore {
  constructor(private readonly files: ObjectStore) {}

  private key(id: string, ext: 'csv' | 'json') {
    if (!isImportId(id)) throw new Error('bad import id');
    return `imports/${id}.${ext}`;
  }

  async save(buffer: Buffer, meta: Omit<ImportMeta, 'id' | 'status' | 'uploadedAt' | 'bytes'>): Promise<ImportMeta> {
    const full: ImportMeta = { ...meta, id: randomBytes(16).toString('hex'), status: 'uploaded', uploadedAt: new Date().toISOString(), bytes: buffer.length };
    // Both files or neither: a failed sidecar removes the CSV already in place.
    await this.files.put(this.key(full.id, 'csv'), buffer, { what: 'the file', contentType: 'text/csv' });
    try {
      await this.update(full);
    } catch (err) {
      await this.files.delete(this.key(full.id, 'csv')).catch(() => undefined);
      throw err;
    }
    return full;
  }

  async get(organisationId: string, id: string): Promise<ImportMeta | undefined> {
    if (!isImportId(id)) return undefined;
    const file = await this.files.get(this.key(id, 'json'), 'the uploaded file');
    if (!file) return undefined;
    try {
      const meta = JSON.parse((await readAll(file)).toString('utf8')) as ImportMeta;
      return meta.organisationId === organisationId ? meta : undefined;
    } catch {
      return undefined;
    }
  }

  async read(meta: ImportMeta): Promise<Buffer> {
    const file = await this.files.get(this.key(meta.id, 'csv'), 'the uploaded file');
    if (!file) throw Object.assign(new Error(`import ${meta.id}: its file is gone`), { code: 'ENOENT' });
    return readAll(file);
  }

  /** Replaced whole (a put never shows half a file), so a reader never sees half a sidecar. */
  async update(meta: ImportMeta): Promise<void> {
    await this.files.put(this.key(meta.id, 'json'), Buffer.from(JSON.stringify(meta)), { what: 'the file', contentType: 'application/json' });
  }

  /** Removes uploads older than `days` (run now and then; an old id then answers 404). */
  async sweep(days = 30): Promise<void> {
    const cutoff = Date.now() - days * 86_400_000;
    const old = (await this.files.list('imports/')).filter((o) => o.modified.getTime() < cutoff);
    await Promise.all(old.map((o) => this.files.delete(o.key).catch(() => undefined)));
  }
}

// 7. Jobs: the commit runs in the background (server/platform/jobs.ts) and the page polls it -------

export type JobPhase = 'checking' | 'writing' | 'imported' | 'failed' | 'error';

/** An import's commit as the pages show it, from its job (readable on every server). */
export interface ImportJob {
  id: string;
  phase: JobPhase;
  done: number;
  total: number;
  result?: ImportResult;
  /** On "failed": how many problems the check found (nothing was written). */
  problemCount?: number;
  mapping: Mapping;
  /** On "error": what went wrong, for the log. */
  message?: string;
}

/** Progress as one number: checking is the first half, writing the second. */
export function jobPercent(job: Pick<ImportJob, 'phase' | 'done' | 'total'>): number {
  if (job.phase === 'imported') return 100;
  const part = job.total ? job.done / job.total : 0;
  if (job.phase === 'checking') return Math.floor(50 * part);
  if (job.phase === 'writing') return 50 + Math.floor(49 * part);
  return 0;
}
