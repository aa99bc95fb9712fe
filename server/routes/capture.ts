import fs from 'node:fs';
import path from 'node:path';
import { Router, type Request, type Response } from 'express';
import type { ViteDevServer } from 'vite';
import { requireRole } from '../auth/guards';
import { CLIENT_DIST } from '../http/assets';

/**
 * The sampler's React app: one index.html for /capture and every path below it (React Router
 * takes over in the browser). From Vite's middleware in development, the built files otherwise.
 */
export function captureApp(vite?: ViteDevServer): Router {
  const router = Router();
  const guard = requireRole('sampler', 'clerk', 'admin');
  let builtHtml: string | null = null;

  const serve = async (req: Request, res: Response) => {
    let html: string;
    if (vite) {
      const source = fs.readFileSync(path.resolve('client/index.html'), 'utf8');
      html = await vite.transformIndexHtml(req.originalUrl, source);
    } else {
      builtHtml ??= fs.readFileSync(path.join(CLIENT_DIST, 'index.html'), 'utf8');
      html = builtHtml;
    }
    res.setHeader('Cache-Control', 'no-cache');
    res.type('html').send(html);
  };

  router.get('/capture', guard, serve);
  router.get('/capture/{*splat}', guard, serve);
  return router;
}
