import { ConnectSessionKnexStore } from 'connect-session-knex';
import type { Knex } from 'knex';
import type { SessionData } from 'express-session';
import type { FastReads } from '../platform/fast-reads';

/**
 * The SQLite/PostgreSQL session store, with the sliding expiry written at most once a minute per
 * session: express-session touches the store on every request, and a write per read request is
 * the largest cost of a signed-in read (docs/server-notes.md, 5).
 */
export class SessionStore extends ConnectSessionKnexStore {
  private lastTouch = new Map<string, number>();
  constructor(
    knex: Knex,
    private touchEveryMs = 60_000,
    cleanupInterval = 10 * 60_000,
    private fast?: FastReads,
  ) {
    super({ knex, tableName: 'sessions', createTable: false, cleanupInterval });
  }

  override async get(sid: string, callback?: (err: unknown, session?: SessionData | null) => void): Promise<SessionData | null> {
    if (!this.fast) return super.get(sid, callback as never);
    try {
      // The same condition as the store's own query, in the same date form it writes.
      const json = this.fast.sessionJson(sid, new Date().toISOString());
      const session = json ? (JSON.parse(json) as SessionData) : null;
      callback?.(null, session);
      return session;
    } catch (err) {
      callback?.(err);
      throw err;
    }
  }

  override async touch(sid: string, session: SessionData, callback?: () => void): Promise<void> {
    const now = Date.now();
    const last = this.lastTouch.get(sid) ?? 0;
    if (now - last < this.touchEveryMs) {
      callback?.();
      return;
    }
    this.lastTouch.set(sid, now);
    if (this.lastTouch.size > 50_000) this.lastTouch.clear(); // bounded memory
    return super.touch(sid, session, callback);
  }
}
