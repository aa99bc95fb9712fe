import helmet from 'helmet';
import lusca from 'lusca';
import type { RequestHandler } from 'express';
import { HttpError } from './errors';

/**
 * Security headers. The content security policy allows only the app's own scripts, styles, fonts
 * and images; no inline script. In development Vite's hot reload needs inline styles and a socket.
 */
export function securityHeaders(dev: boolean): RequestHandler {
  const { set, removed } = recorded(helmetFor(dev));
  // A JSON answer is never a page that runs or frames anything: it keeps nosniff and the resource
  // policy, and a content policy that allows nothing; the headers only a document acts on are left
  // off, as they are for built scripts and styles (DOCUMENT_ONLY).
  const api: Header[] = [...set.filter(([name]) => !DOCUMENT_ONLY.includes(name.toLowerCase())), ['Content-Security-Policy', API_CONTENT_POLICY]];
  return (req, res, next) => {
    for (const [name, value] of req.url.startsWith('/api/') ? api : set) res.setHeader(name, value);
    for (const name of removed) res.removeHeader(name);
    next();
  };
}

type Header = [string, string | number | readonly string[]];

/** The content policy of JSON answers: nothing may load, and no page may frame them. */
export const API_CONTENT_POLICY = "default-src 'none'; frame-ancestors 'none'";

/**
 * Headers that only a document (or a worker) acts on. Built scripts, styles, fonts and the web
 * manifest go without them (server/platform/compress.ts), and so do JSON answers.
 */
export const DOCUMENT_ONLY = [
  'content-security-policy',
  'cross-origin-opener-policy',
  'origin-agent-cluster',
  'referrer-policy',
  'strict-transport-security',
  'x-dns-prefetch-control',
  'x-download-options',
  'x-frame-options',
  'x-permitted-cross-domain-policies',
  'x-xss-protection',
];

/**
 * helmet's headers do not depend on the request (no nonces here), so they are worked out once and
 * then copied onto each response: the same headers for a fraction of the per-request work.
 */
function recorded(middleware: RequestHandler): { set: Header[]; removed: string[] } {
  const set: Header[] = [];
  const removed: string[] = [];
  const recorder = {
    setHeader: (name: string, value: string | number | readonly string[]) => void set.push([name, value]),
    removeHeader: (name: string) => void removed.push(name),
  };
  middleware({} as never, recorder as never, () => undefined);
  return { set, removed };
}

function helmetFor(dev: boolean): RequestHandler {
  return helmet({
    contentSecurityPolicy: {
      directives: {
        defaultSrc: ["'self'"],
        scriptSrc: dev ? ["'self'", "'unsafe-inline'"] : ["'self'"], // Vite's React refresh preamble is inline
        styleSrc: dev ? ["'self'", "'unsafe-inline'"] : ["'self'"],
        fontSrc: ["'self'"],
        imgSrc: ["'self'", 'data:', 'blob:'],
        connectSrc: dev ? ["'self'", 'ws:'] : ["'self'"],
        workerSrc: ["'self'"],
        manifestSrc: ["'self'"],
        objectSrc: ["'none'"],
        baseUri: ["'self'"],
        formAction: ["'self'"],
        frameAncestors: ["'none'"],
        // Served over plain HTTP on a farm office network too (docs/server-notes.md, 4).
        upgradeInsecureRequests: null,
      },
    },
    crossOriginEmbedderPolicy: false,
  });
}

/**
 * lusca's CSRF check on every mutating request. The JSON sign-in is the one exception: a
 * cross-site page cannot send an application/json body without a CORS preflight, which this
 * server never grants, and a signed-out client has no token yet.
 */
const SAFE = new Set(['GET', 'HEAD', 'OPTIONS']);

export function csrfProtection(): RequestHandler {
  const check = lusca.csrf();
  return (req, res, next) => {
    // Reads of the JSON API need no token and render no form: skip lusca's per-request token
    // work (GET /api/session still gets one: it hands the token to the client).
    if (SAFE.has(req.method) && req.path.startsWith('/api/') && req.path !== '/api/session') return next();
    // A read checks nothing: lusca's token is made on the first call of req.csrfToken() only (its
    // check on a read does nothing else), and that first call answers the token just made rather
    // than making and comparing a second one.
    if (SAFE.has(req.method)) {
      req.csrfToken = () => {
        check(req, res, () => undefined); // a read: lusca sets its token and req.csrfToken, nothing else
        return res.locals._csrf as string;
      };
      return next();
    }
    // A signed-out client's write is told to sign in (401) rather than that its token is missing:
    // it has no session a token could belong to. Sign-in and sign-out themselves stay open.
    if (!SAFE.has(req.method) && req.path.startsWith('/api/') && !req.user && !(req.path === '/api/session' && (req.method === 'POST' || req.method === 'DELETE'))) {
      return next(new HttpError('unauthenticated'));
    }
    if (req.method === 'POST' && req.path === '/api/session' && req.is('application/json')) {
      // Let lusca treat it as a safe read, so req.csrfToken() still hands out a token.
      const asRead = Object.create(req, { method: { value: 'GET' } });
      return check(asRead, res, (err?: unknown) => {
        req.csrfToken = asRead.csrfToken;
        next(err);
      });
    }
    return check(req, res, next);
  };
}

/**
 * Every answer of the app itself (pages, JSON, CSV, PDF, photos) is kept out of the browser's and
 * any proxy's cache: on a shared office computer nothing may be read back after sign-out. Only the
 * built assets under /static, mounted before this, are cached (they hold no data).
 */
export const noStore: RequestHandler = (_req, res, next) => {
  res.setHeader('Cache-Control', 'no-store');
  next();
};
