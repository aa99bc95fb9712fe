import { Router } from 'express';
import type { AppContext } from '../platform/app-context';
import { can } from '../platform/permissions';
import { listCrops } from './service';

/** GET /api/crops: the crop list every install has (from a migration), for any signed-in role. */
export function cropsApi(ctx: AppContext): Router {
  const router = Router();
  router.get('/', can('registry.read'), async (_req, res) => {
    const items = await listCrops(ctx.db);
    res.json({ items, total: items.length });
  });
  return router;
}
