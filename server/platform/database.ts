import fs from 'node:fs';
import path from 'node:path';
import knex, { type Knex } from 'knex';
import { migrationSource } from '../../migrations';

export type Db = Knex;

/**
 * Opens the embedded SQLite database. WAL, NORMAL sync and a busy timeout keep concurrent reads
 * fast and let a second process (a job, a test) wait instead of failing (docs/server-notes.md, 5).
 */
export function openDatabase(file: string): Db {
  if (file !== ':memory:') fs.mkdirSync(path.dirname(path.resolve(file)), { recursive: true });
  return knex({
    client: 'better-sqlite3',
    connection: { filename: file },
    useNullAsDefault: true,
    pool: {
      min: 1,
      max: 1,
      afterCreate(conn: { pragma: (s: string) => unknown }, done: (err: Error | null, conn: unknown) => void) {
        conn.pragma('journal_mode = WAL');
        conn.pragma('synchronous = NORMAL');
        conn.pragma('busy_timeout = 5000');
        conn.pragma('foreign_keys = ON');
        done(null, conn);
      },
    },
  });
}

/** Runs every migration not yet applied. Migrations are imported statically (docs/server-notes.md, 1). */
export async function migrateLatest(db: Db): Promise<string[]> {
  const [, applied] = await db.migrate.latest({ migrationSource });
  return applied as string[];
}
