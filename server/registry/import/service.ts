import path from 'node:path';
import type { Knex } from 'knex';
import * as plantingsDb from '../plantings-db';
import { HttpError } from '../../platform/errors';
import { Mapping, autoMapping, mappingFromParams } from './columns';
import { ParsedCsv, parseCsv } from './read';
import { CropOption } from './values';
import { CheckResult, checkRows, loadSnapshot } from './check';
import { ImportActor, commitImport } from './write';
import { ImportJob, ImportJobs, ImportMeta, ImportStore } from './store';
import type { ObjectStore } from '../../platform/object-store';

/**
 * The registry CSV import: read an uploaded file (read.ts), map its columns to Crowntip's
 * (columns.ts), check every row against the registry (values.ts, check.ts: pure, on a snapshot of
 * the registry), and write all rows in one transaction or none (write.ts). Uploads are kept
 * between preview and commit, and the commit runs as an in-process job (store.ts); template.ts
 * makes the template and example files. This file is the import as the routes use it.
 */
export * from './columns';
export * from './read';
export * from './values';
export * from './check';
export * from './write';
export * from './store';
export * from './template';

// 9. The import as the routes use it ---------------------------------------------------------

export interface ImportPreview {
  meta: ImportMeta;
  parsed: ParsedCsv;
  mapping: Mapping;
  check: CheckResult;
  crops: CropOption[];
}

export type CommitStart = { kind: 'imported'; meta: ImportMeta } | { kind: 'job'; job: ImportJob };

export function createRegistryImports(db: Knex, files: ObjectStore) {
  const store = new ImportStore(files);
  const jobs = new ImportJobs();
  let lastSweep = 0;

  async function load(organisationId: string, id: string): Promise<ImportMeta> {
    const meta = await store.get(organisationId, id);
    if (!meta) throw new HttpError('not_found', 'This import was not found. Upload the file again.');
    return meta;
  }

  async function readParsed(meta: ImportMeta): Promise<ParsedCsv> {
    return parseCsv(await store.read(meta));
  }

  return {
    store,
    jobs,
    load,

    /** Reads the file once (so that an unreadable one is refused at once) and keeps it. */
    async upload(actor: ImportActor, fileName: string, buffer: Buffer): Promise<{ meta: ImportMeta; parsed: ParsedCsv }> {
      const parsed = parseCsv(buffer);
      if (Date.now() - lastSweep > 86_400_000) {
        lastSweep = Date.now();
        await store.sweep();
      }
      const meta = await store.save(buffer, { organisationId: actor.organisationId, userId: actor.id, userName: actor.name, fileName: path.basename(fileName || 'upload.csv') });
      return { meta, parsed };
    },

    async preview(meta: ImportMeta, params: Record<string, unknown>, units: 'us' | 'metric'): Promise<ImportPreview> {
      const parsed = await readParsed(meta);
      const mapping = mappingFromParams(params, parsed.headers.length, autoMapping(parsed.headers, units));
      const crops = await plantingsDb.listCrops(db);
      const check = checkRows(parsed, { mapping, snapshot: await loadSnapshot(db, meta.organisationId), crops });
      return { meta, parsed, mapping, check, crops };
    },

    /**
     * Starts the commit, or answers with what is already there: an import that is done stays done
     * (the sidecar says so), and a running one is not started twice.
     */
    async commit(meta: ImportMeta, params: Record<string, unknown>, actor: ImportActor, units: 'us' | 'metric'): Promise<CommitStart> {
      if (meta.status === 'imported') return { kind: 'imported', meta };
      const running = jobs.get(meta.organisationId, meta.id);
      if (running && (jobs.isRunning(meta.id) || running.phase === 'imported')) return { kind: 'job', job: running };
      const parsed = await readParsed(meta);
      // Checked again after the await: another request may have started it meanwhile.
      const again = jobs.get(meta.organisationId, meta.id);
      if (again && (jobs.isRunning(meta.id) || again.phase === 'imported')) return { kind: 'job', job: again };
      const mapping = mappingFromParams(params, parsed.headers.length, autoMapping(parsed.headers, units));
      const job = jobs.start(meta.id, meta.organisationId, mapping, parsed.rows.length, async (j) => {
        await store.update({ ...meta, status: 'importing', mapping });
        const crops = await plantingsDb.listCrops(db);
        const outcome = await commitImport(db, actor, { fileName: meta.fileName, parsed, mapping, crops }, (p) => {
          j.phase = p.phase;
          j.done = p.done;
          j.total = p.total;
        });
        j.finishedAt = Date.now();
        if (outcome.ok) {
          j.result = outcome.result;
          j.phase = 'imported';
          // Should this write fail, a second commit still cannot duplicate anything: every row
          // would then find its planting already in the registry and the import would stop.
          await store.update({ ...meta, status: 'imported', mapping, result: outcome.result });
        } else {
          j.check = outcome.check;
          j.phase = 'failed';
          await store.update({ ...meta, status: 'uploaded', mapping });
        }
      });
      return { kind: 'job', job };
    },
  };
}

export type RegistryImports = ReturnType<typeof createRegistryImports>;
