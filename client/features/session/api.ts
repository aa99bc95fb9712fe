import { queryOptions, useMutation } from '@tanstack/react-query';
import { api, ApiError, noContent, type ApiClient } from '../../lib/api';

export const sessionKeys = {
  all: ['session'] as const,
  current: () => [...sessionKeys.all, 'current'] as const,
};

/** One options object for the route loader, the hook and invalidation. */
export const sessionQuery = queryOptions({
  queryKey: sessionKeys.current(),
  queryFn: ({ signal }) => api.session({ signal }),
  staleTime: 5 * 60_000,
});

/**
 * `DELETE /api/session`, then the office sign-in page. A 401 means already signed out, so it
 * counts as done; any other failure (offline, server error) stays here for the button to show.
 * The full-page load drops the query cache, so nothing is cleared by hand.
 */
export async function signOut(client: ApiClient = api, navigate = (url: string) => window.location.assign(url)) {
  try {
    await client.delete('/api/session', noContent, { redirectOn401: false });
  } catch (err) {
    if (!(err instanceof ApiError && err.status === 401)) throw err;
  }
  client.resetCsrfToken();
  navigate('/login');
}

export function useSignOut() {
  return useMutation({ mutationFn: () => signOut() });
}
