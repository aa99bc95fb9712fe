import Database from 'better-sqlite3';

/**
 * The two reads every signed-in request makes (its session and its user), on a second, read-only
 * SQLite connection with prepared statements. Knex builds and prepares each query anew, which is
 * most of a signed-in read's cost (measured in `npm run bench`). WAL mode lets this connection
 * read while the main one writes; it sees every committed change at once, so a deactivated user
 * is still refused on their next request. Only for a database file: an in-memory database (tests)
 * and other databases use the ordinary Knex queries.
 */
export interface FastReads {
  sessionJson(sid: string, nowIso: string): string | undefined;
  userRow(id: string): Record<string, unknown> | undefined;
  /** SQLite's data version on this connection: it changes whenever any other connection commits. */
  dataVersion(): number;
  close(): void;
}

export function openFastReads(file: string): FastReads | undefined {
  if (!file || file === ':memory:') return undefined;
  const conn = new Database(file, { readonly: true, fileMustExist: true });
  conn.pragma('busy_timeout = 5000');
  const session = conn.prepare('select sess from sessions where sid = ? and datetime(?) <= datetime(expired)');
  const user = conn.prepare(
    `select users.id, users.organisation_id, organisations.name as organisation_name, users.name, users.email,
            users.password_hash, users.role, users.active, users.units, users.language, users.last_sign_in_at, users.created_at,
            users.session_version
       from users join organisations on organisations.id = users.organisation_id
      where users.id = ?`,
  );
  const version = conn.prepare('pragma data_version').pluck();
  return {
    dataVersion: () => version.get() as number,
    sessionJson: (sid, nowIso) => (session.get(sid, nowIso) as { sess: string } | undefined)?.sess,
    userRow: (id) => user.get(id) as Record<string, unknown> | undefined,
    close: () => conn.close(),
  };
}
