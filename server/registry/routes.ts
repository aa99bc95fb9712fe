import type { Express } from 'express';
import type { AppContext } from '../app';
import { ranchesApi } from './ranches-routes';
import { fieldsApi } from './fields-routes';
import { plantingsApi } from './plantings-routes';
import { cropsApi } from './crops-routes';
import { historyApi } from './history-routes';

/** The registry's JSON API (../shared/API.md, Registry), with the crop list and the change history. */
export function mountRegistryApi(app: Express, ctx: AppContext): void {
  app.use('/api/ranches', ranchesApi(ctx));
  app.use('/api/fields', fieldsApi(ctx));
  app.use('/api/plantings', plantingsApi(ctx));
  app.use('/api/crops', cropsApi(ctx));
  app.use('/api/history', historyApi(ctx));
}
