import { ConnectSessionKnexStore } from 'connect-session-knex';
import type { Knex } from 'knex';
import type { SessionData } from 'express-session';

/**
 * The SQLite/PostgreSQL session store, with the sliding expiry written at most once a minute per
 * session: express-session touches the store on every request, and a write per read request is
 * the largest cost of a signed-in read (../shared/STACK.md, 14).
 */
export class SessionStore extends ConnectSessionKnexStore {
  private lastTouch = new Map<string, number>();
  constructor(knex: Knex, private touchEveryMs = 60_000, cleanupInterval = 10 * 60_000) {
    super({ knex, tableName: 'sessions', createTable: false, cleanupInterval });
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
