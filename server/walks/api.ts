import type { Express } from 'express';
import type { AppContext } from '../app';
import { rulesApi } from '../rules/current-routes';
import { todayApi } from './today-routes';
import { walkAssignmentsApi } from './assignment-routes';
import { walksApi } from './routes';

/** Field walks' JSON API (../shared/API.md, Field walks), the sampler's today list, walk assignments and the current rule. */
export function mountWalksApi(app: Express, ctx: AppContext): void {
  app.use('/api/walks', walksApi(ctx));
  app.use('/api/today', todayApi(ctx));
  app.use('/api/plantings', walkAssignmentsApi(ctx));
  app.use('/api/rules', rulesApi(ctx));
}
