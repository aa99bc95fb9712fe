import path from 'node:path';
import express, { type Express, type Request, type Router } from 'express';
import session from 'express-session';
import { pino, type Logger } from 'pino';
import type { Knex } from 'knex';
import type { ViteDevServer } from 'vite';
import type { Config } from './platform/config';
import type { AppContext } from './platform/app-context';
import type { FastReads } from './platform/fast-reads';
import { ROLE_LABELS } from './platform/roles';
import { CROP_LABELS } from '../shared/registry/crops';
import { errorHandler, isApiRequest, notFound } from './platform/errors';
import { viewPermissions } from './platform/permissions';
import { csrfProtection, noStore, securityHeaders } from './platform/security';
import { CLIENT_DIST, readOfficeAssets } from './platform/assets';
import { makeFormatter } from './platform/format';
import { requestContext } from './platform/context';
import { captureApp } from './platform/capture-app';
import { compressDynamic, staticAssets } from './platform/compress';
import { requestLog } from './platform/request-log';
import { readCache } from './platform/read-cache';
import { PROJECT_ROOT } from './platform/project-root';
import { healthRoutes, type Lifecycle } from './platform/health';
import type { ObjectStore } from './platform/object-store';
import { openObjectStore } from './platform/open-object-store';
import { createJobQueue, type JobQueue } from './platform/jobs';
import { isPostgres } from './platform/database';
import * as people from './people';
import * as mail from './mail';
import * as registry from './registry';
import * as walks from './walks';
import * as calibrations from './calibrations';
import * as rules from './rules';
import * as registers from './registers';

export interface AppDeps {
  config: Config;
  db: Knex;
  logger?: Logger;
  mailer?: mail.Mailer;
  /** Vite in middleware mode, for `npm run dev` only. */
  vite?: ViteDevServer;
  /** Prepared-statement reads of sessions and users on a database file (see server/platform/fast-reads.ts). */
  fastReads?: FastReads;
  /** Where sign-in, reset-mail and upload attempts are counted; the database on PostgreSQL (every server counts together), else memory. */
  attemptStore?: people.AttemptStore;
  /** Background jobs; made for the database when not given (server/main.ts starts and stops it). */
  jobs?: JobQueue;
  /** The secret that signs session cookies. */
  sessionSecret: string;
  /** Where uploaded files are kept; from the settings (UPLOADS_DIR or S3_BUCKET) when not given. */
  files?: ObjectStore;
  /** Flipped by the shutdown in server/main.ts so that /readyz turns 503 while requests drain. */
  lifecycle?: Lifecycle;
}

const isRead = (req: Request) => req.method === 'GET' || req.method === 'HEAD';

/** Builds the whole app; only server/main.ts listens, so tests build it on a fresh database each. */
export function createApp(deps: AppDeps): Express {
  const { config, db } = deps;
  const logger = deps.logger ?? pino({ level: config.isTest ? 'silent' : config.LOG_LEVEL });
  const mailer = deps.mailer ?? mail.createMailer(db, { smtpUrl: config.SMTP_URL, from: config.MAIL_FROM, logger });
  const files = deps.files ?? openObjectStore(config);
  const jobs = deps.jobs ?? createJobQueue(db, { logger });
  const ctx: AppContext = { config, db, logger, mailer, files, jobs, reads: readCache(deps.fastReads?.dataVersion) };

  const app = express();
  app.set('trust proxy', config.TRUST_PROXY);
  app.set('view engine', 'ejs');
  app.set('views', path.join(PROJECT_ROOT, 'views'));
  app.disable('x-powered-by');
  // Every answer of the app is no-store (server/platform/security.ts): a browser keeps nothing to
  // revalidate, so hashing each body for an ETag is work for nothing.
  app.set('etag', false);
  app.locals.roleLabels = ROLE_LABELS;
  app.locals.cropLabels = CROP_LABELS;

  app.use(securityHeaders(Boolean(deps.vite)));

  // Built assets come first: they need no session, so no session row is made for them.
  if (deps.vite) {
    app.use(deps.vite.middlewares);
  } else {
    app.use('/static', staticAssets(CLIENT_DIST)); // the build's .br/.gz copies (server/platform/compress.ts)
  }

  // One compact line per request, none for health checks; off entirely below info (LOG_LEVEL=warn).
  const logRequests = requestLog(logger);
  if (logRequests) app.use(logRequests);
  app.use(compressDynamic()); // pages, JSON, CSV above 1 KB; never PDFs or photos
  app.use(noStore);
  app.use(healthRoutes({ db, files, lifecycle: deps.lifecycle ?? { draining: false } }));

  // Reads carry no body: skip the parsers' content-type checks for them.
  const json = express.json({ limit: '1mb' });
  const form = express.urlencoded({ extended: false, limit: '1mb' });
  app.use((req, res, next) => (isRead(req) ? next() : json(req, res, (err?: unknown) => (err ? next(err) : form(req, res, next)))));

  const passport = people.configurePassport(db, config.BCRYPT_ROUNDS, deps.fastReads);
  app.use(
    session({
      name: 'crowntip.sid',
      secret: deps.sessionSecret,
      store: new people.SessionStore(db, 60_000, config.isTest ? 0 : 10 * 60_000, deps.fastReads),
      resave: false,
      saveUninitialized: false, // no session row for anonymous page views (docs/server-notes.md, 2)
      cookie: {
        httpOnly: true,
        sameSite: 'lax',
        secure: 'auto', // Secure whenever the request came over HTTPS (through a trusted proxy)
        maxAge: config.SESSION_HOURS * 3600 * 1000,
      },
    }),
  );
  // passport's per-request set-up gives req.logIn and req.logout, which only writes use (sign-in,
  // sign-out, the password change); reads skip it, as the user is loaded by sessionUser below.
  const signInOut = passport.initialize();
  app.use((req, res, next) => (isRead(req) ? next() : signInOut(req, res, next)));
  app.use(people.sessionUser(db, deps.fastReads)); // what passport.session() does, for less per request
  app.use(requestContext);

  // Sign-in limits run before the CSRF check, so a flood of bad tokens still counts (docs/server-notes.md, 3).
  const limits = people.accessLimits(
    {
      perPair: config.SIGNIN_LIMIT_PER_PAIR,
      perAddress: config.SIGNIN_LIMIT_PER_ADDRESS,
      perAccount: config.SIGNIN_LIMIT_PER_ACCOUNT,
      slowdownMs: config.SIGNIN_SLOWDOWN_MS,
      forgotPerAddress: config.FORGOT_LIMIT_PER_ADDRESS,
      forgotPerAccount: config.FORGOT_LIMIT_PER_ACCOUNT,
      uploadsPerHour: config.UPLOAD_LIMIT_PER_HOUR,
    },
    deps.attemptStore ?? (isPostgres(db) ? new people.DatabaseAttemptStore(db) : undefined),
  );
  app.post('/login', limits.signIn);
  app.post('/api/session', limits.signIn);
  app.use(limits.uploads); // before any multipart body is read

  // Page defaults first, so that even a page rejected by the CSRF check renders its error.
  app.locals.assets = readOfficeAssets(Boolean(deps.vite));
  app.use((req, res, next) => {
    if (isApiRequest(req)) return next(); // JSON answers render no page
    const { user, units, locale } = req.context!;
    res.locals.user = user;
    res.locals.can = viewPermissions(user?.role);
    res.locals.currentPath = req.path;
    res.locals.fmt = makeFormatter(units, locale);
    res.locals.csrfToken = '';
    res.locals.flash = req.session?.flash ?? null;
    if (req.session?.flash) delete req.session.flash;
    next();
  });

  // Multipart forms are parsed before the CSRF check so that it can read their token.
  app.post(registry.FIELD_FORM_PATHS, registry.boundaryUpload);
  app.post(calibrations.CALIBRATION_UPLOAD_PATHS, calibrations.calibrationUpload);
  app.post(registry.IMPORT_UPLOAD_PATHS, registry.importUploadBeforeCsrf);
  app.use(csrfProtection());
  app.use((req, res, next) => {
    if (!isApiRequest(req)) res.locals.csrfToken = req.csrfToken ? req.csrfToken() : '';
    next();
  });

  // The route table: every JSON path and the one router that answers it (the README's API section lists the paths).
  const api: [string, Router][] = [
    ['/api/session', people.sessionApi(ctx, passport)],
    ['/api/ranches', registry.ranchesApi(ctx)],
    ['/api/fields', registry.fieldsApi(ctx)],
    ['/api/fields', registry.boundaryProposalsApi(ctx)],
    ['/api/plantings', registry.plantingsApi(ctx)],
    ['/api/plantings', walks.assignmentsApi(ctx)],
    ['/api/crops', registry.cropsApi(ctx)],
    ['/api/history', registry.historyApi(ctx)],
    ['/api/calibrations', calibrations.calibrationsApi(ctx)],
    ['/api/walks', walks.tissueNApi(ctx)],
    ['/api/walks', walks.walksApi(ctx)],
    ['/api/today', walks.todayApi(ctx)],
    ['/api/rules', rules.rulesApi(ctx)],
    ['/api/registers', registers.registersApi(ctx)],
  ];
  for (const [prefix, router] of api) app.use(prefix, router);
  app.use('/api', notFound);

  // The office pages and the capture app, in the order they are tried ('/' routers hold full paths).
  const pages: [string, Router][] = [
    ['/', people.authPages(ctx, passport, limits)],
    ['/', people.homePages(ctx)],
    ['/', people.accountPages(ctx)],
    ['/admin/users', people.userAdminPages(ctx)],
    ['/admin/outbox', mail.outboxPages(ctx)],
    ['/', registry.boundaryProposalPages(ctx)],
    ['/', registry.registryPages(ctx)],
    ['/', registry.seasonPages(ctx)],
    ['/', walks.assignmentPages(ctx)],
    ['/', registry.historyPages(ctx)],
    ['/registry/import', registry.registryImportPages(ctx)],
    ['/', rules.rulesPages(ctx)],
    ['/', calibrations.calibrationPages(ctx)],
    ['/', registers.registerPages(ctx)],
    ['/', walks.walkReviewPages(ctx)],
    ['/', captureApp(deps.vite)],
  ];
  for (const [prefix, router] of pages) app.use(prefix, router);

  app.use(notFound);
  app.use(errorHandler(logger, viewPermissions));
  return app;
}
