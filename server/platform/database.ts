import fs from 'node:fs';
import path from 'node:path';
import knex, { type Knex } from 'knex';
import pg from 'pg';
import { migrationSource } from '../../migrations';
import { keepPreparedStatements } from './sqlite-statements';

export type Db = Knex;

export interface DatabaseOptions {
  /** Most connections one server keeps open to PostgreSQL (SQLite always uses one). */
  poolMax?: number;
  /** PostgreSQL cancels a statement running longer than this (0: no limit). */
  statementTimeoutMs?: number;
}

/**
 * Runs `work` as one unit: every db-module call made with the transaction it is given commits
 * together or not at all. Services mark their units of work with this, so that no file outside the
 * db modules calls Knex itself (DEVELOPERS.md, "Layers, one way").
 */
export function inTransaction<T>(db: Knex, work: (trx: Knex.Transaction) => Promise<T>): Promise<T> {
  return db.transaction(work);
}

export const isPostgresUrl = (target: string) => /^postgres(ql)?:\/\//i.test(target);

/** True when the database is PostgreSQL (the pg client); false for the embedded SQLite. */
export const isPostgres = (db: Knex) => db.client.config.client === 'pg';

/** The connection address without its password, for messages and logs. */
export function describeTarget(target: string): string {
  if (!isPostgresUrl(target)) return `SQLite file ${target}`;
  try {
    const u = new URL(target);
    if (u.password) u.password = '***';
    return `PostgreSQL at ${u.host}${u.pathname}${u.username ? ` as ${decodeURIComponent(u.username)}` : ''}`;
  } catch {
    return 'PostgreSQL (unreadable DATABASE_URL)';
  }
}

// The answers must not depend on the engine: SQLite hands back what was written (ISO strings for
// dates and times, numbers for counts and sums), so PostgreSQL's values are turned into the same.
const { builtins } = pg.types;
const defaultParser = (oid: number) => pg.types.getTypeParser(oid, 'text') as (s: string) => unknown;
const toIso = (parse: (s: string) => unknown) => (s: string) => {
  const d = parse(s);
  return d instanceof Date && !Number.isNaN(d.getTime()) ? d.toISOString() : s;
};
const PARSERS: Record<number, (s: string) => unknown> = {
  [builtins.DATE]: (s) => s, // 'YYYY-MM-DD', never a Date at local midnight
  [builtins.TIMESTAMPTZ]: toIso(defaultParser(builtins.TIMESTAMPTZ)),
  // The session expiry column has no zone; every connection runs in UTC (see afterCreate).
  [builtins.TIMESTAMP]: (s) => toIso(defaultParser(builtins.TIMESTAMPTZ))(`${s}+00`),
  [builtins.NUMERIC]: (s) => Number(s),
  [builtins.INT8]: (s) => Number(s), // counts and sums of integers; all far below 2^53
};
const pgTypes = {
  getTypeParser: (oid: number, format?: string) =>
    format === 'binary' ? pg.types.getTypeParser(oid, 'binary') : (PARSERS[oid] ?? defaultParser(oid)),
};

/**
 * Opens the database: PostgreSQL when `target` is a postgres:// address, otherwise the embedded
 * SQLite file (or ':memory:'). SQLite gets WAL, NORMAL sync and a busy timeout so concurrent reads
 * stay fast and a second process (a job, a test) waits instead of failing (docs/server-notes.md, 5).
 */
export function openDatabase(target: string, opts: DatabaseOptions = {}): Db {
  if (isPostgresUrl(target)) {
    return knex({
      client: 'pg',
      connection: {
        connectionString: target,
        types: pgTypes,
        ...(opts.statementTimeoutMs ? { statement_timeout: opts.statementTimeoutMs } : {}),
      } as Knex.PgConnectionConfig,
      pool: {
        min: 0,
        max: opts.poolMax ?? 10,
        afterCreate(conn: pg.Client, done: (err: Error | null, conn: unknown) => void) {
          conn.query("set time zone 'UTC'", (err) => done(err ?? null, conn));
        },
      },
      acquireConnectionTimeout: 30_000,
    });
  }
  const file = target;
  if (file !== ':memory:') fs.mkdirSync(path.dirname(path.resolve(file)), { recursive: true });
  return knex({
    client: 'better-sqlite3',
    connection: { filename: file },
    useNullAsDefault: true,
    pool: {
      min: 1,
      max: 1,
      afterCreate(conn: { pragma: (s: string) => unknown; prepare: (sql: string) => unknown }, done: (err: Error | null, conn: unknown) => void) {
        keepPreparedStatements(conn);
        conn.pragma('journal_mode = WAL');
        conn.pragma('synchronous = NORMAL');
        conn.pragma('busy_timeout = 5000');
        conn.pragma('foreign_keys = ON');
        done(null, conn);
      },
    },
  });
}

/** Where the server's data lives: DATABASE_URL when set, else the SQLite file. */
export const databaseTarget = (config: { DATABASE_URL?: string; DATABASE_FILE: string }) => config.DATABASE_URL || config.DATABASE_FILE;

/** Opens the database the settings name, with the pool size and statement timeout they give. */
export const openConfiguredDatabase = (config: {
  DATABASE_URL?: string;
  DATABASE_FILE: string;
  DATABASE_POOL_MAX: number;
  DATABASE_STATEMENT_TIMEOUT_MS: number;
}) => openDatabase(databaseTarget(config), { poolMax: config.DATABASE_POOL_MAX, statementTimeoutMs: config.DATABASE_STATEMENT_TIMEOUT_MS });

/** One cheap round trip: resolves when the database answers. */
export async function pingDatabase(db: Db): Promise<void> {
  await db.raw('select 1');
}

/**
 * Waits until the database answers (a PostgreSQL server may still be starting beside the app),
 * retrying for at most `timeoutMs`; then fails with one sentence naming the address and the cause.
 */
export async function waitForDatabase(
  db: Db,
  target: string,
  { timeoutMs = 30_000, intervalMs = 1000, onRetry }: { timeoutMs?: number; intervalMs?: number; onRetry?: (message: string) => void } = {},
): Promise<void> {
  const deadline = Date.now() + timeoutMs;
  for (let attempt = 1; ; attempt++) {
    try {
      await pingDatabase(db);
      return;
    } catch (err) {
      const cause = err instanceof Error ? err.message || err.name : String(err);
      if (Date.now() + intervalMs > deadline) {
        throw new Error(
          `Crowntip cannot reach its database (${describeTarget(target)}) after ${attempt} attempts in ${Math.round(timeoutMs / 1000)} s: ${cause}. ` +
            'Check DATABASE_URL and that the database server is running.',
          { cause: err },
        );
      }
      onRetry?.(`waiting for the database (${describeTarget(target)}): ${cause}`);
      await new Promise((r) => setTimeout(r, intervalMs));
    }
  }
}

/** Runs every migration not yet applied. Migrations are imported statically (docs/server-notes.md, 1). */
export async function migrateLatest(db: Db): Promise<string[]> {
  const [, applied] = await db.migrate.latest({ migrationSource });
  return applied as string[];
}
