import fs from 'node:fs';
import path from 'node:path';
import { Router, type Request, type Response } from 'express';
import type { ViteDevServer } from 'vite';
import { can } from './permissions';
import { CLIENT_DIST } from './assets';
import { PROJECT_ROOT } from './project-root';
import { loadBuilt, sendBuilt, type Built } from './compress';
import { captureShells } from './capture-shell';

/**
 * The sampler's React app: one index.html for /capture and every path below it (React Router
 * takes over in the browser). From Vite's middleware in development, the built files otherwise.
 *
 * Its service worker (built by vite-plugin-pwa into client/dist/sw.js) is served at
 * /capture/sw.js, so that it may control /capture (the header widens its scope from /capture/ to
 * /capture, the shell's own address). It holds nothing private, so it needs no sign-in: the
 * browser re-checks it for updates even when the session has expired.
 */
export function captureApp(vite?: ViteDevServer): Router {
  const router = Router();
  const guard = can('capture.use');
  // The built shell and worker with their brotli and gzip copies (scripts/precompress.ts), read once.
  let shells: ReturnType<typeof captureShells> | null = null;
  let builtWorker: Built | null = null;

  const serve = async (req: Request, res: Response) => {
    res.type('html'); // no-store, as every signed-in answer (server/platform/security.ts)
    if (vite) {
      const source = fs.readFileSync(path.join(PROJECT_ROOT, 'client', 'index.html'), 'utf8');
      res.send(await vite.transformIndexHtml(req.originalUrl, source));
      return;
    }
    // The shell with the preloads of the sampler's language, session and (on Today) list (capture-shell.ts).
    shells ??= captureShells();
    sendBuilt(req, res, shells(req.user?.language === 'es' ? 'es' : 'en', req.path === '/capture' || req.path === '/capture/'));
  };

  const serviceWorker = (req: Request, res: Response) => {
    const file = path.join(CLIENT_DIST, 'sw.js');
    if (vite || !fs.existsSync(file)) {
      res.status(404).type('text/plain').send('No service worker in development.');
      return;
    }
    res.setHeader('Service-Worker-Allowed', '/capture');
    res.setHeader('Cache-Control', 'no-cache'); // the browser asks again on each visit; the ETag saves the bytes
    res.type('application/javascript');
    builtWorker ??= loadBuilt(file);
    sendBuilt(req, res, builtWorker);
  };

  router.get('/capture/sw.js', serviceWorker);
  router.get('/capture', guard, serve);
  router.get('/capture/{*splat}', guard, serve);
  return router;
}
