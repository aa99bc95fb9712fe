import type { Knex } from 'knex';
import * as ranchesDb from '../ranches-db';
import * as fieldsDb from '../fields-db';
import * as plantingsDb from '../plantings-db';
import { appendChange, appendChanges, type ChangeWrite } from '../history-db';
import { cropName } from '../../../shared/registry/crops';
import { Mapping } from './columns';
import { ParsedCsv } from './read';
import { CropOption } from './values';
import { CheckResult, canImport, checkRows, createChecker, loadSnapshot } from './check';
import { expectDefined } from '../../platform/expect-defined';
import { inTransaction } from '../../platform/database';

// 5. The commit -------------------------------------------------------------------------------

export interface ImportActor {
  id: string;
  name: string;
  organisationId: string;
}

export interface ImportProgress {
  phase: 'checking' | 'writing';
  done: number;
  total: number;
}

export interface ImportResult {
  rows: number;
  ranchesCreated: string[];
  fieldsCreated: number;
  plantingsCreated: number;
  seasons: string[];
  ms: number;
  at: string;
}

export type CommitOutcome = { ok: true; result: ImportResult } | { ok: false; check: CheckResult };

const yieldToEventLoop = () => new Promise<void>((resolve) => setImmediate(resolve));

/**
 * Imports every row in one transaction, or nothing when any row has a problem. The rows are first
 * checked outside the transaction in chunks (so that progress can be asked for in between), then
 * checked again inside it against a fresh snapshot, so that a record added meanwhile cannot slip
 * through. Each created ranch, field and planting gets one history entry with action "import".
 */
export async function commitImport(
  db: Knex,
  actor: ImportActor,
  input: { fileName: string; parsed: ParsedCsv; mapping: Mapping; crops: readonly CropOption[] },
  onProgress: (p: ImportProgress) => void = () => {},
): Promise<CommitOutcome> {
  const started = performance.now();
  const { parsed, mapping, crops } = input;
  const total = parsed.rows.length;
  const org = actor.organisationId;

  onProgress({ phase: 'checking', done: 0, total });
  const checker = createChecker({ mapping, delimiter: parsed.delimiter, snapshot: await loadSnapshot(db, org), crops });
  for (let i = 0; i < total; i++) {
    checker.check(parsed.rows[i]!);
    if ((i + 1) % 500 === 0) {
      onProgress({ phase: 'checking', done: i + 1, total });
      await yieldToEventLoop();
    }
  }
  const first = checker.finish();
  if (!canImport(first)) return { ok: false, check: first };
  onProgress({ phase: 'writing', done: 0, total });

  const file = input.fileName.length > 80 ? `${input.fileName.slice(0, 77)}…` : input.fileName;
  const user = { id: actor.id, name: actor.name };
  return inTransaction(db, async (trx): Promise<CommitOutcome> => {
    const snapshot = await loadSnapshot(trx, org);
    const check = checkRows(parsed, { mapping, snapshot, crops });
    if (!canImport(check)) return { ok: false, check };

    const ranchIds = new Map<string, string>();
    const ranchNames = new Map<string, string>();
    for (const [key, r] of snapshot.ranches) {
      ranchIds.set(key, r.id);
      ranchNames.set(key, r.name);
    }
    for (const r of check.newRanches) {
      const name = r.name.trim();
      const id = await ranchesDb.insertRanch(trx, org, { name });
      ranchIds.set(r.key, id);
      ranchNames.set(r.key, name);
      await appendChange(trx, org, {
        entityType: 'ranch',
        entityId: id,
        action: 'import',
        user,
        before: null,
        after: { name, code: null, county: null, notes: null, contactEmails: [] },
        summary: `Ranch “${name}” created by the import of “${file}” (row ${r.line})`,
      });
    }

    const fieldIds = new Map<string, string>();
    const fieldNames = new Map<string, string>();
    for (const [key, f] of snapshot.fields) {
      fieldIds.set(key, f.id);
      fieldNames.set(key, f.name);
    }
    // Fields and plantings go in a few hundred rows per statement, each with its history entry.
    const newFields = check.newFields.map((f) => ({
      f,
      write: { ranchId: ranchIds.get(f.ranchKey)!, name: f.name.trim(), areaHa: f.areaHa!, boundary: null, boundaryAreaHa: null, notes: null },
    }));
    // One id per field, in the order given.
    const newFieldIds = await fieldsDb.insertFields(trx, org, newFields.map((n) => n.write));
    await appendChanges(
      trx,
      org,
      newFields.map(({ f, write: { ranchId, name, areaHa } }, i): ChangeWrite => {
        const id = expectDefined(newFieldIds[i], 'the id made for an imported field');
        fieldIds.set(f.key, id);
        fieldNames.set(f.key, name);
        return {
          entityType: 'field',
          entityId: id,
          action: 'import',
          user,
          before: null,
          after: { ranchId, name, areaHa, boundary: null, notes: null },
          summary: `Field “${name}” created on ${ranchNames.get(f.ranchKey)} by the import of “${file}” (row ${f.line})`,
        };
      }),
    );

    const plantings = check.rows.map((row) => ({
      row,
      write: {
        fieldId: fieldIds.get(row.fieldKey)!,
        season: row.season!,
        crop: row.crop!,
        variety: row.variety,
        seededOn: row.seededOn!,
        seedingRateKgHa: row.seedingRateKgHa,
        plannedTerminationOn: row.plannedTerminationOn,
        terminatedOn: row.terminatedOn,
        notes: row.notes,
      },
    }));
    // One id per planting, in the order given.
    const plantingIds = await plantingsDb.insertPlantings(
      trx,
      org,
      plantings.map((p) => p.write),
      (done) => onProgress({ phase: 'writing', done, total }),
    );
    await appendChanges(
      trx,
      org,
      plantings.map(
        ({ row, write }, i): ChangeWrite => ({
          entityType: 'planting',
          entityId: expectDefined(plantingIds[i], 'the id made for an imported planting'),
          action: 'import',
          user,
          before: null,
          after: write,
          summary: `Planting ${row.season} (${cropName(row.crop ?? 'other')}) on ${fieldNames.get(row.fieldKey)}, ${ranchNames.get(row.ranchKey)}, imported from “${file}” (row ${row.line})`,
        }),
      ),
    );
    onProgress({ phase: 'writing', done: total, total });
    return {
      ok: true,
      result: {
        rows: total,
        ranchesCreated: check.newRanches.map((r) => r.name.trim()),
        fieldsCreated: check.newFields.length,
        plantingsCreated: check.rows.length,
        seasons: check.seasons,
        ms: Math.round(performance.now() - started),
        at: new Date().toISOString(),
      },
    };
  });
}
