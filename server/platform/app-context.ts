import type { Knex } from 'knex';
import type { Logger } from 'pino';
import type { Config } from './config';
import type { Mailer } from './mail';
import type { ObjectStore } from './object-store';
import type { ReadCache } from './read-cache';
import type { JobQueue } from './jobs';

/** What every resource's routers are built with: one per app (server/app.ts makes it). */
export interface AppContext {
  config: Config;
  db: Knex;
  logger: Logger;
  mailer: Mailer;
  /** Uploaded files: UPLOADS_DIR or an S3-compatible bucket (server/platform/object-store.ts). */
  files: ObjectStore;
  /** List answers kept while the database is unchanged (server/platform/read-cache.ts). */
  reads: ReadCache;
  /** Background jobs (server/platform/jobs.ts): register builds, imports, the daily reminder. */
  jobs: JobQueue;
}
