import type { Knex } from 'knex';
import type { AttemptStore } from './sign-in-limits';
import { expectDefined } from '../platform/expect-defined';

/**
 * Attempt counters in the database (table attempt_counts), so that every app server counts
 * against one limit. Each hit is one atomic upsert: a new key, or a key whose window has ended,
 * starts again at 1; otherwise its count goes up by one. Used on PostgreSQL (server/app.ts).
 */
export class DatabaseAttemptStore implements AttemptStore {
  private hits = 0;
  constructor(private readonly db: Knex) {}

  async hit(key: string, windowMs: number): Promise<number> {
    const now = Date.now();
    if (++this.hits % 1000 === 0) await this.db('attempt_counts').where('window_ends_ms', '<=', now).delete(); // ended windows
    const { rows } = await this.db.raw<{ rows: { count: number | string }[] }>(
      `insert into attempt_counts (key, count, window_ends_ms) values (?, 1, ?)
       on conflict (key) do update set
         count = case when attempt_counts.window_ends_ms <= ? then 1 else attempt_counts.count + 1 end,
         window_ends_ms = case when attempt_counts.window_ends_ms <= ? then excluded.window_ends_ms else attempt_counts.window_ends_ms end
       returning count`,
      [key, now + windowMs, now, now],
    );
    return Number(expectDefined(rows[0], 'the counted row of an upsert … returning').count);
  }

  async count(key: string): Promise<number> {
    const row = await this.db('attempt_counts').where({ key }).where('window_ends_ms', '>', Date.now()).first('count');
    return row ? Number(row.count) : 0;
  }

  async reset(key: string): Promise<void> {
    await this.db('attempt_counts').where({ key }).delete();
  }
}
