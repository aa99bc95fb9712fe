/*
 * `npm run backup`: a consistent copy of the database while the server keeps running.
 * SQLite: SQLite's online backup (better-sqlite3's backup()) into data/backups/crowntip-<UTC time>.sqlite
 * (BACKUP_DIR to change the folder). PostgreSQL (DATABASE_URL set): prints the pg_dump command to
 * run, since the dump is made by PostgreSQL's own tool on a machine that has it.
 */
import fs from 'node:fs';
import path from 'node:path';
import { pathToFileURL } from 'node:url';
import Database from 'better-sqlite3';
import { describeTarget, isPostgresUrl } from '../server/platform/database';

const stamp = (d: Date) => d.toISOString().replace(/\..*$/, '').replace(/[-:]/g, '').replace('T', '-');

/** Copies the SQLite file `file` into `dir`; answers the new file's path. */
export async function backupSqlite(file: string, dir: string, now = new Date()): Promise<string> {
  if (!fs.existsSync(file)) throw new Error(`There is no database file at ${file}.`);
  fs.mkdirSync(dir, { recursive: true });
  const dest = path.join(dir, `crowntip-${stamp(now)}.sqlite`);
  const db = new Database(file, { readonly: true, fileMustExist: true });
  try {
    await db.backup(dest);
  } finally {
    db.close();
  }
  return dest;
}

/** The pg_dump command for a PostgreSQL installation (custom format, restorable with pg_restore). */
export function pgDumpCommand(dir: string, now = new Date()): string {
  const out = path.join(dir, `crowntip-${stamp(now)}.dump`);
  return `pg_dump --format=custom --no-owner --file=${JSON.stringify(out)} "$DATABASE_URL"`;
}

async function main() {
  const dir = process.env.BACKUP_DIR || 'data/backups';
  const url = process.env.DATABASE_URL;
  if (url && isPostgresUrl(url)) {
    console.log(`The database is ${describeTarget(url)}. Back it up with PostgreSQL's own tool, from any machine that has it:`);
    console.log(`  ${pgDumpCommand(dir)}`);
    console.log('Restore into an empty database with: pg_restore --no-owner --dbname="$DATABASE_URL" FILE');
    return;
  }
  const file = process.env.DATABASE_FILE || 'data/crowntip.sqlite';
  const dest = await backupSqlite(file, dir);
  console.log(`Backed up ${file} to ${dest} (${(fs.statSync(dest).size / 1024).toFixed(0)} KB). Keep copies on another machine.`);
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) {
  main().catch((err) => {
    console.error(`The backup failed: ${err instanceof Error ? err.message : String(err)}`);
    process.exit(1);
  });
}
