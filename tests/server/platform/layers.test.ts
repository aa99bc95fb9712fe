import fs from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';

/*
 * SQL lives in db modules only (DEVELOPERS.md, "Layers, one way"): routes, pages and services call
 * functions named by intent, and services mark a unit of work with `inTransaction`. This reads
 * every server file outside the db modules for the shapes a Knex call takes.
 */
const isDbModule = (file: string) =>
  /(^|\/)db\.ts$|-db\.ts$/.test(file) ||
  // The platform's database plumbing: opening and migrating (database.ts), the tenant read helper
  // (scope.ts) and the prepared reads on a second SQLite connection (fast-reads.ts, sqlite-statements.ts).
  ['server/platform/database.ts', 'server/platform/scope.ts', 'server/platform/fast-reads.ts', 'server/platform/sqlite-statements.ts'].includes(file);

// A query begun on a Knex instance or transaction, raw SQL, a transaction, or schema work.
const KNEX_CALL = /\b(db|trx|knex|tx)\s*\(\s*['"`]|\.raw\(|\.transaction\(|\.schema\.|\.prepare\(\s*['"`]/;

function serverFiles(dir: string): string[] {
  return fs.readdirSync(dir, { withFileTypes: true }).flatMap((e) => {
    const p = path.posix.join(dir, e.name);
    return e.isDirectory() ? serverFiles(p) : p.endsWith('.ts') ? [p] : [];
  });
}

describe('layers', () => {
  it('no file outside the db modules calls Knex or writes SQL', () => {
    const offenders = serverFiles('server')
      .filter((f) => !isDbModule(f))
      .flatMap((f) =>
        fs
          .readFileSync(f, 'utf8')
          .split('\n')
          .flatMap((line, i) => (KNEX_CALL.test(line) && !/^\s*(\/\/|\*)/.test(line) ? [`${f}:${i + 1}: ${line.trim()}`] : [])),
      );
    expect(offenders).toEqual([]);
  });

  it('the check sees the shapes it looks for', () => {
    // Lines a service must not contain, and lines it may.
    for (const bad of ["const rows = await db('fields').where({ id });", 'await trx.raw(\'select 1\');', 'return db.transaction(async (trx) => {', "conn.prepare('select 1')"]) {
      expect(KNEX_CALL.test(bad), bad).toBe(true);
    }
    for (const good of ['return inTransaction(db, async (trx) => {', 'await fieldsDb.insertField(trx, organisationId, input);', "path.join(dir, 'x')"]) {
      expect(KNEX_CALL.test(good), good).toBe(false);
    }
  });
});
