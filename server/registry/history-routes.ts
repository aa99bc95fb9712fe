import { Router, type Request, type Response } from 'express';
import { z } from 'zod';
import type { AppContext } from '../platform/app-context';
import { contextOf } from '../platform/context';
import { can } from '../platform/permissions';
import { validateQuery } from '../platform/validation';
import { listHistory } from './service';
import { isoDate, pagingSchema } from '../../shared/schemas/registry';
import { idFilter, listQuery } from '../platform/query';

const listSchema = listQuery(
  pagingSchema.extend({
    entityType: z.enum(['ranch', 'field', 'planting'], { message: 'Use ranch, field or planting.' }).optional(),
    entityId: idFilter.optional(),
    userId: idFilter.optional(),
    action: z.enum(['create', 'update', 'delete', 'import'], { message: 'Use create, update, delete or import.' }).optional(),
    from: isoDate.optional(),
    to: isoDate.optional(),
  }),
);

/** GET /api/history: the organisation's append-only change history, newest first; not for samplers. */
export function historyApi(ctx: AppContext): Router {
  const router = Router();

  const list = async (req: Request, res: Response) => {
    res.json(await listHistory(ctx.db, contextOf(req).organisationId, res.locals.query as z.infer<typeof listSchema>));
  };

  router.get('/', can('history.read'), validateQuery(listSchema), list);
  return router;
}
