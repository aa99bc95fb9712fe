import { Router, type Request, type Response } from 'express';
import type { z } from 'zod';
import type { AppContext } from '../platform/app-context';
import { requireRole, requireSignIn } from '../platform/guards';
import { HttpError } from '../platform/errors';
import { validateBody, validateQuery } from '../platform/validation';
import { getField, listFields } from './fields-db';
import { createField, updateField } from './service';
import { fieldInputSchema, fieldPatchSchema, pagingSchema } from '../../shared/schemas/registry';
import { actorOf, idFilter, listQuery, searchText } from './route-helpers';

const listSchema = listQuery(pagingSchema.extend({ ranchId: idFilter.optional(), q: searchText.optional() }));

/** /api/fields (../shared/API.md, Registry): everyone in the organisation reads, clerk and admin write. */
export function fieldsApi(ctx: AppContext): Router {
  const router = Router();
  const writers = requireRole('clerk', 'admin');

  const list = async (req: Request, res: Response) => {
    res.json(await listFields(ctx.db, req.user!.organisationId, res.locals.query as z.infer<typeof listSchema>));
  };

  const show = async (req: Request<{ id: string }>, res: Response) => {
    const field = await getField(ctx.db, req.user!.organisationId, req.params.id);
    if (!field) throw new HttpError('not_found');
    res.json(field);
  };

  const create = async (req: Request, res: Response) => {
    res.status(201).json(await createField(ctx.db, actorOf(req), req.body));
  };

  const update = async (req: Request<{ id: string }>, res: Response) => {
    res.json(await updateField(ctx.db, actorOf(req), req.params.id, req.body));
  };

  router.get('/', requireSignIn, validateQuery(listSchema), list);
  router.post('/', writers, validateBody(fieldInputSchema), create);
  router.get('/:id', requireSignIn, show);
  router.patch('/:id', writers, validateBody(fieldPatchSchema), update);
  return router;
}
