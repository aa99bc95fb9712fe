import fs from 'node:fs';
import path from 'node:path';
import { randomBytes } from 'node:crypto';
import { pino } from 'pino';
import { loadConfig, type Config } from './platform/config';
import { openConfiguredDatabase, migrateLatest, waitForDatabase, databaseTarget, describeTarget, isPostgres } from './platform/database';
import { shutDown, type Lifecycle } from './platform/health';
import { createJobQueue } from './platform/jobs';
import { countOrganisations } from './platform/organisations-db';
import { createApp } from './app';
import { openFastReads } from './platform/fast-reads';
import { openObjectStore } from './platform/open-object-store';
import { createMailer } from './mail';
import { scheduleDailyJobs } from './reminders';
import { clientIsBuilt } from './platform/assets';
import { seedDemoScenario } from '../seeds/01_demo_scenario';
import { DEMO_USERS } from '../seeds/demo-people';

/** The cookie-signing secret: from the environment, or made once and kept beside the database. */
function sessionSecret(config: Config): string {
  return config.SESSION_SECRET ?? keptSecret(config, '.session-secret');
}

/** A random secret made once and kept in a file beside the database (not in it), readable by the server only. */
function keptSecret(config: Config, name: string): string {
  const file = path.join(path.dirname(path.resolve(config.DATABASE_FILE)), name);
  if (!fs.existsSync(file)) {
    fs.mkdirSync(path.dirname(file), { recursive: true });
    fs.writeFileSync(file, randomBytes(32).toString('hex'), { mode: 0o600 });
  }
  return fs.readFileSync(file, 'utf8').trim();
}

async function main() {
  const config = loadConfig();
  const logger = pino({ level: config.LOG_LEVEL });
  // Registers are signed with a key kept outside the database (README, "Register signatures").
  config.REGISTER_SIGNING_KEY ??= keptSecret(config, '.register-signing-key');
  if (!config.S3_BUCKET) fs.mkdirSync(path.resolve(config.UPLOADS_DIR), { recursive: true });

  const target = databaseTarget(config);
  const db = openConfiguredDatabase(config);
  await waitForDatabase(db, target, {
    timeoutMs: config.DATABASE_WAIT_SECONDS * 1000,
    onRetry: (message) => logger.warn(message),
  });
  const applied = await migrateLatest(db);
  if (applied.length) logger.info({ applied }, 'database migrated');

  let seeded = false;
  if (config.SEED_DEMO && (await countOrganisations(db)) === 0) {
    await seedDemoScenario(db, { password: config.DEMO_PASSWORD, bcryptRounds: config.BCRYPT_ROUNDS, history: config.SEED_DEMO_HISTORY });
    seeded = true;
  }

  let vite;
  if (config.isDev) {
    const { createServer } = await import('vite');
    vite = await createServer({ server: { middlewareMode: true }, appType: 'custom' });
  } else if (!clientIsBuilt()) {
    logger.info('building the capture app (first start)…');
    const { build } = await import('vite');
    await build({ logLevel: 'warn' });
  }

  const mailer = createMailer(db, { smtpUrl: config.SMTP_URL, from: config.MAIL_FROM, logger });
  // The prepared-statement reads open the SQLite file a second time; PostgreSQL has no such file.
  const fastReads = isPostgres(db) ? undefined : openFastReads(config.DATABASE_FILE);
  const lifecycle: Lifecycle = { draining: false };
  const files = openObjectStore(config);
  await files.health().catch((err: Error) => logger.warn(`the file store is not ready yet: ${err.message} (GET /readyz answers 503 until it is)`));
  const jobs = createJobQueue(db, { logger });
  const app = createApp({ config, db, logger, mailer, vite, fastReads, lifecycle, files, jobs, sessionSecret: sessionSecret(config) });
  const stopDailyJobs = config.DAILY_JOBS
    ? scheduleDailyJobs({ db, jobs, mailer, logger, publicUrl: config.PUBLIC_URL, daysAhead: config.REMIND_DAYS_AHEAD })
    : () => {};
  // Every server works on jobs (register builds, imports, reminders) queued by any server.
  await jobs.start();
  const server = app.listen(config.PORT, config.HOST, () => {
    const url = config.PUBLIC_URL;
    const lines = [
      '',
      `Crowntip is running at ${url}`,
      `Database: ${describeTarget(target)}`,
      `Files: ${files.kind === 'disk' ? files.where : `S3-compatible store, ${files.where}`}`,
      seeded ? 'The invented demo scenario was loaded into the new database.' : '',
      config.SEED_DEMO
        ? `Demo sign-ins (password "${config.DEMO_PASSWORD}"):\n${DEMO_USERS.map((u) => `  ${u.role.padEnd(8)} ${u.email}`).join('\n')}`
        : '',
      '',
    ].filter((l) => l !== '');
    console.log(lines.join('\n'));
  });

  // On SIGTERM (a deploy, a scale-down): stop taking requests, let those in flight finish, close
  // the pool, exit. A second signal exits at once.
  let stopping = false;
  const stop = (signal: string) => {
    if (stopping) process.exit(1);
    stopping = true;
    logger.info({ signal }, 'shutting down: finishing requests in flight');
    stopDailyJobs();
    // No more jobs are taken here; those running finish within the grace time or go back to the
    // queue for another server (PostgreSQL) or the next start (SQLite).
    const jobsStopped = jobs.stop(config.SHUTDOWN_GRACE_SECONDS * 1000);
    void shutDown(server, {
      lifecycle,
      graceMs: config.SHUTDOWN_GRACE_SECONDS * 1000,
      release: async () => {
        await jobsStopped.catch((err) => logger.error({ err }, 'job queue did not stop cleanly'));
        fastReads?.close();
        await db.destroy();
      },
    })
      .then((outcome) => {
        console.log(outcome === 'drained' ? 'Crowntip stopped: every request finished.' : 'Crowntip stopped: requests still running were cut off.');
        process.exit(0);
      })
      .catch((err) => {
        console.error(err);
        process.exit(1);
      });
  };
  process.on('SIGINT', () => stop('SIGINT'));
  process.on('SIGTERM', () => stop('SIGTERM'));
}

main().catch((err) => {
  console.error(err instanceof Error ? err.message : err);
  process.exit(1);
});
