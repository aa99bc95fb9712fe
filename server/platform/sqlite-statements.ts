/**
 * Knex prepares every SQLite query anew (better-sqlite3's `prepare`), which costs about as much as
 * running the small queries of a list or a session read. The same SQL text comes back on every
 * request (values travel as bindings), so the connection keeps its prepared statements, keyed by
 * the SQL text, the most recently used first, at most `limit` of them. A statement is run to the
 * end synchronously before the next one starts (one connection, one thread), so reusing it is
 * safe; SQLite prepares it again by itself after a schema change.
 */
interface Preparing {
  prepare(sql: string): unknown;
}

export function keepPreparedStatements<T extends Preparing>(conn: T, limit = 500): T {
  const prepare = conn.prepare.bind(conn);
  const kept = new Map<string, unknown>();
  conn.prepare = (sql: string) => {
    let statement = kept.get(sql);
    if (statement === undefined) {
      statement = prepare(sql);
      if (kept.size >= limit) kept.delete(kept.keys().next().value as string); // the least recently used
    } else {
      kept.delete(sql);
    }
    kept.set(sql, statement);
    return statement;
  };
  return conn;
}
