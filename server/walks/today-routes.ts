import { Router, type Request, type Response } from 'express';
import { z } from 'zod';
import type { AppContext } from '../platform/app-context';
import { contextOf } from '../platform/context';
import { can } from '../platform/permissions';
import { validateQuery } from '../platform/validation';
import { todayList } from './service';
import { listQuery, searchText } from '../platform/query';

const todaySchema = listQuery(z.object({ q: searchText.optional() }));

/**
 * GET /api/today: the plantings of the current season still in the ground, those assigned to
 * the signed-in user first (`assigned: true`), then the rest of the organisation's; `?q=` filters
 * on the field name.
 */
export function todayApi(ctx: AppContext): Router {
  const router = Router();
  const list = async (req: Request, res: Response) => {
    res.json(await todayList(ctx.db, contextOf(req), res.locals.query as z.infer<typeof todaySchema>));
  };
  router.get('/', can('walks.create'), validateQuery(todaySchema), list);
  return router;
}
