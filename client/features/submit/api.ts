import { queryOptions } from '@tanstack/react-query';
import { walkSchema } from '../../../shared/schemas/walks';
import { api } from '../../lib/api';
import { walkKeys } from './keys';

export { walkKeys };

/** The walk as the server stored it, with its estimate snapshot ("stored result"). */
export const walkQuery = (id: string) =>
  queryOptions({
    queryKey: walkKeys.detail(id),
    queryFn: ({ signal }) => api.get(`/api/walks/${encodeURIComponent(id)}`, walkSchema, { signal }),
    staleTime: 30_000,
  });
