import { Router, type Request, type Response } from 'express';
import { z } from 'zod';
import type { AppContext } from '../platform/app-context';
import { contextOf } from '../platform/context';
import { can } from '../platform/permissions';
import { HttpError } from '../platform/errors';
import { validateBody, validateQuery } from '../platform/validation';
import { getRanch, listRanches, RANCH_SORTS, type Ranch, type RanchSort } from './service';
import { createRanch, deleteRanch, updateRanch } from './service';
import { pagingSchema, ranchInputSchema, ranchPatchSchema, seasonSchema } from '../../shared/schemas/registry';
import { currentSeason } from './route-helpers';
import { listQuery, searchText } from '../platform/query';

// Sort keys as the answer spells them (camelCase); the office pages' column names work too.
const SORT_ALIASES: Record<string, RanchSort> = {
  fieldCount: 'field_count',
  totalAreaHa: 'total_area_ha',
  coverCroppedAreaHa: 'cover_cropped_area_ha',
};
const SORT_KEYS = [...RANCH_SORTS, ...Object.keys(SORT_ALIASES)];
const sortSchema = z
  .string()
  .refine((s) => SORT_KEYS.includes(s), `Sort by one of: name, code, county, ${Object.keys(SORT_ALIASES).join(', ')}.`)
  .transform((s) => SORT_ALIASES[s] ?? (s as RanchSort));

const listSchema = listQuery(
  pagingSchema.extend({
    q: searchText.optional(),
    season: seasonSchema.optional(),
    sort: sortSchema.optional(),
    dir: z.enum(['asc', 'desc'], { message: 'Use asc or desc.' }).optional(),
  }),
);
const seasonQuery = listQuery(z.object({ season: seasonSchema.optional() }));

/** A ranch as the API answers it: with the season its cover-cropped area was counted for. */
const answer = (ranch: Ranch, season: string) => ({ ...ranch, coverCroppedSeason: season });

/** /api/ranches (README, "API"): everyone in the organisation reads, clerk and admin write. */
export function ranchesApi(ctx: AppContext): Router {
  const router = Router();
  const writers = can('registry.write');

  // Kept while the database is unchanged, per organisation and query (server/platform/read-cache.ts).
  const list = async (req: Request, res: Response) => {
    const { organisationId } = contextOf(req);
    const query = { ...(res.locals.query as z.infer<typeof listSchema>) };
    query.season ??= currentSeason();
    const season = query.season;
    await ctx.reads.sendJson(req, res, `ranches ${organisationId} ${JSON.stringify(query)}`, async () => {
      const { items, total } = await listRanches(ctx.db, organisationId, { ...query, season });
      return { items: items.map((r) => answer(r, season)), total };
    });
  };

  const show = async (req: Request<{ id: string }>, res: Response) => {
    const season = (res.locals.query as z.infer<typeof seasonQuery>).season ?? currentSeason();
    const ranch = await getRanch(ctx.db, contextOf(req).organisationId, req.params.id, season);
    if (!ranch) throw new HttpError('not_found');
    res.json(answer(ranch, season));
  };

  // The service counts a written ranch's totals for the current season.
  const create = async (req: Request, res: Response) => {
    res.status(201).json(answer(await createRanch(ctx.db, contextOf(req), req.body), currentSeason()));
  };

  const update = async (req: Request<{ id: string }>, res: Response) => {
    res.json(answer(await updateRanch(ctx.db, contextOf(req), req.params.id, req.body), currentSeason()));
  };

  const remove = async (req: Request<{ id: string }>, res: Response) => {
    await deleteRanch(ctx.db, contextOf(req), req.params.id);
    res.status(204).end();
  };

  router.get('/', can('registry.read'), validateQuery(listSchema), list);
  router.post('/', writers, validateBody(ranchInputSchema), create);
  router.get('/:id', can('registry.read'), validateQuery(seasonQuery), show);
  router.patch('/:id', writers, validateBody(ranchPatchSchema), update);
  router.delete('/:id', writers, remove);
  return router;
}
