import { randomBytes } from 'node:crypto';
import type { ObjectStore } from '../platform/object-store';
import { readAll } from '../platform/object-store';
import type { BoundaryFormat, UploadedShape } from './boundary-files';

/**
 * A boundary file's shapes, kept between the upload and the clerk's choice (one shape for a field,
 * or many fields at once): `boundaries/<id>.json` in the file store, 128 random bits, read back
 * only by the same organisation, so any server can answer the next step. Old ones are swept after a day.
 */
export interface KeptShapes {
  id: string;
  organisationId: string;
  fileName: string;
  format: BoundaryFormat;
  shapes: UploadedShape[];
  nameKeys: string[];
  skipped: number;
}

const ID = /^[a-f0-9]{32}$/;
export const isShapesId = (id: unknown): id is string => typeof id === 'string' && ID.test(id);
const key = (id: string) => `boundaries/${id}.json`;

export class BoundaryUploads {
  private lastSweep = 0;
  constructor(private readonly files: ObjectStore) {}

  async keep(kept: Omit<KeptShapes, 'id'>): Promise<KeptShapes> {
    const full = { ...kept, id: randomBytes(16).toString('hex') };
    await this.files.put(key(full.id), Buffer.from(JSON.stringify(full)), { what: 'the boundary file', contentType: 'application/json' });
    void this.sweep().catch(() => undefined);
    return full;
  }

  async get(organisationId: string, id: unknown): Promise<KeptShapes | undefined> {
    if (!isShapesId(id)) return undefined;
    const file = await this.files.get(key(id), 'the uploaded boundary file');
    if (!file) return undefined;
    try {
      const kept = JSON.parse((await readAll(file)).toString('utf8')) as KeptShapes;
      return kept.organisationId === organisationId ? kept : undefined;
    } catch {
      return undefined;
    }
  }

  private async sweep() {
    if (Date.now() - this.lastSweep < 3_600_000) return;
    this.lastSweep = Date.now();
    const cutoff = Date.now() - 86_400_000;
    const old = (await this.files.list('boundaries/')).filter((o) => o.modified.getTime() < cutoff);
    await Promise.all(old.map((o) => this.files.delete(o.key).catch(() => undefined)));
  }
}
