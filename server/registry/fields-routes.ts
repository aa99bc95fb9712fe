import { Router, type Request, type Response } from 'express';
import type { z } from 'zod';
import type { AppContext } from '../platform/app-context';
import { contextOf } from '../platform/context';
import { can } from '../platform/permissions';
import { HttpError } from '../platform/errors';
import { validateBody, validateQuery } from '../platform/validation';
import { getField, listFields } from './service';
import { createField, updateField } from './service';
import { fieldInputSchema, fieldPatchSchema, pagingSchema } from '../../shared/schemas/registry';
import { idFilter, listQuery, searchText } from '../platform/query';

const listSchema = listQuery(pagingSchema.extend({ ranchId: idFilter.optional(), q: searchText.optional() }));

/** /api/fields (README, "API"): everyone in the organisation reads, clerk and admin write. */
export function fieldsApi(ctx: AppContext): Router {
  const router = Router();
  const writers = can('registry.write');

  // Kept while the database is unchanged, per organisation and query (server/platform/read-cache.ts).
  const list = async (req: Request, res: Response) => {
    const { organisationId } = contextOf(req);
    const query = res.locals.query as z.infer<typeof listSchema>;
    await ctx.reads.sendJson(req, res, `fields ${organisationId} ${JSON.stringify(query)}`, () => listFields(ctx.db, organisationId, query));
  };

  const show = async (req: Request<{ id: string }>, res: Response) => {
    const field = await getField(ctx.db, contextOf(req).organisationId, req.params.id);
    if (!field) throw new HttpError('not_found');
    res.json(field);
  };

  const create = async (req: Request, res: Response) => {
    res.status(201).json(await createField(ctx.db, contextOf(req), req.body));
  };

  const update = async (req: Request<{ id: string }>, res: Response) => {
    res.json(await updateField(ctx.db, contextOf(req), req.params.id, req.body));
  };

  router.get('/', can('registry.read'), validateQuery(listSchema), list);
  router.post('/', writers, validateBody(fieldInputSchema), create);
  router.get('/:id', can('registry.read'), show);
  router.patch('/:id', writers, validateBody(fieldPatchSchema), update);
  return router;
}
