import type { Knex } from 'knex';
import type { Logger } from 'pino';
import type { Config } from './config';
import type { Mailer } from '../mail/public';

/** What every resource's routers are built with: one per app (server/app.ts makes it). */
export interface AppContext {
  config: Config;
  db: Knex;
  logger: Logger;
  mailer: Mailer;
}
