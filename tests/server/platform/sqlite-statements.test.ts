import Database from 'better-sqlite3';
import { afterEach, describe, expect, it } from 'vitest';
import { keepPreparedStatements } from '../../../server/platform/sqlite-statements';
import { openDatabase } from '../../../server/platform/database';

// The SQLite connection keeps its prepared statements by SQL text: the same text is prepared once,
// answers stay those of the current data and schema, and the number kept is bounded.
const open: Database.Database[] = [];
afterEach(() => open.splice(0).forEach((c) => c.close()));

function counted(limit?: number) {
  const conn = new Database(':memory:');
  open.push(conn);
  let prepared = 0;
  const prepare = conn.prepare.bind(conn);
  conn.prepare = ((sql: string) => {
    prepared++;
    return prepare(sql);
  }) as typeof conn.prepare;
  keepPreparedStatements(conn, limit);
  return { conn, prepared: () => prepared };
}

describe('kept prepared statements', () => {
  it('prepares the same SQL once and still reads the current rows', () => {
    const { conn, prepared } = counted();
    conn.prepare('create table t (a integer)').run();
    const insert = 'insert into t (a) values (?)';
    for (let i = 1; i <= 3; i++) conn.prepare(insert).run(i);
    const sum = () => (conn.prepare('select sum(a) as s from t').get() as { s: number }).s;
    expect(sum()).toBe(6); // 1 + 2 + 3
    conn.prepare(insert).run(4);
    expect(sum()).toBe(10); // 6 + 4: the kept statement reads the new row
    expect(prepared()).toBe(3); // create, insert, select
  });

  it('answers with the new schema after a column is added', () => {
    const { conn } = counted();
    conn.prepare('create table t (a integer)').run();
    conn.prepare('insert into t (a) values (1)').run();
    const all = () => conn.prepare('select * from t').all();
    expect(all()).toEqual([{ a: 1 }]);
    conn.prepare('alter table t add column b text').run();
    expect(all()).toEqual([{ a: 1, b: null }]);
  });

  it('keeps at most the given number, dropping the least recently used', () => {
    const { conn, prepared } = counted(2);
    conn.prepare('select 1'); // kept: 1
    conn.prepare('select 2'); // kept: 1, 2
    conn.prepare('select 1'); // used again: 2, 1
    conn.prepare('select 3'); // 2 dropped: 1, 3
    expect(prepared()).toBe(3);
    conn.prepare('select 1'); // still kept
    expect(prepared()).toBe(3);
    conn.prepare('select 2'); // prepared again
    expect(prepared()).toBe(4);
  });

  it('is what the app database uses: the same Knex query twice is prepared once', async () => {
    const db = openDatabase(':memory:');
    try {
      await db.raw('create table t (a integer)');
      const conn = (await db.client.acquireConnection()) as Database.Database;
      await db.client.releaseConnection(conn);
      const first = conn.prepare('select * from t where a = ?');
      expect(conn.prepare('select * from t where a = ?')).toBe(first);
      await db('t').insert({ a: 5 });
      expect(await db('t').where('a', 5).select('a')).toEqual([{ a: 5 }]);
      expect(await db('t').where('a', 6).select('a')).toEqual([]);
    } finally {
      await db.destroy();
    }
  });
});
