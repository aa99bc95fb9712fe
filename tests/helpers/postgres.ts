import { randomBytes } from 'node:crypto';
import pg from 'pg';

// Throwaway PostgreSQL databases for the tests: each made from a template that was migrated (and
// seeded) once per run by tests/postgres/global-setup.ts, and dropped when the test closes it.

/** The address of `name` on the same server as `adminUrl`. */
export function databaseUrl(adminUrl: string, name: string): string {
  const u = new URL(adminUrl);
  u.pathname = `/${name}`;
  return u.toString();
}

/** Runs one statement on the admin connection (create/drop database cannot run in a transaction). */
export async function adminQuery(adminUrl: string, sql: string): Promise<pg.QueryResult> {
  const client = new pg.Client({ connectionString: adminUrl, connectionTimeoutMillis: 5000 });
  await client.connect();
  try {
    return await client.query(sql);
  } finally {
    await client.end();
  }
}

/** Why PostgreSQL cannot be used for tests, or null when it answers. */
export async function postgresUnavailable(adminUrl: string | undefined): Promise<string | null> {
  if (!adminUrl) return 'TEST_DATABASE_URL is not set';
  try {
    await adminQuery(adminUrl, 'select 1');
    return null;
  } catch (err) {
    const u = new URL(adminUrl);
    return `PostgreSQL at ${u.host} does not answer (${err instanceof Error ? err.message || err.name : String(err)})`;
  }
}

const safeName = (name: string) => {
  if (!/^ct_[a-z0-9_]+$/.test(name)) throw new Error(`not a test database name: ${name}`);
  return name;
};

/** A new database `ct_<run>_<random>`, copied from `template` when given (fast: no migrations). */
export async function createThrowawayDatabase(adminUrl: string, prefix: string, template?: string): Promise<{ name: string; url: string }> {
  const name = safeName(`${prefix}_${randomBytes(5).toString('hex')}`);
  await adminQuery(adminUrl, `create database ${name}${template ? ` template ${safeName(template)}` : ''}`);
  return { name, url: databaseUrl(adminUrl, name) };
}

export async function dropDatabase(adminUrl: string, name: string): Promise<void> {
  await adminQuery(adminUrl, `drop database if exists ${safeName(name)} with (force)`);
}

/** Drops every database whose name starts with `prefix` (a run's leftovers). */
export async function dropDatabasesLike(adminUrl: string, prefix: string): Promise<void> {
  const { rows } = await adminQuery(adminUrl, `select datname from pg_database where datname like '${safeName(prefix)}\\_%'`);
  for (const r of rows) await dropDatabase(adminUrl, r.datname as string);
}
