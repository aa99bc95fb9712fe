import { queryOptions } from '@tanstack/react-query';
import { api } from '../../lib/api';
import { todayAnswer } from '../../lib/first-screen-answers';

export const todayKeys = {
  all: ['today'] as const,
  /** Per user: a phone passed between samplers never shows one the other's list. */
  list: (userId: string) => [...todayKeys.all, userId] as const,
};

/**
 * The whole list (assigned plantings, or all open ones), kept on the phone; the search filters it
 * on the phone so it works without signal too.
 */
export const todayQuery = (userId: string) =>
  queryOptions({
    queryKey: todayKeys.list(userId),
    queryFn: ({ signal }) => api.get('/api/today?limit=500', todayAnswer, { signal }),
    staleTime: 60_000,
  });
