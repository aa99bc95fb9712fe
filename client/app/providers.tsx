import type { ReactNode } from 'react';
import { QueryClient } from '@tanstack/react-query';
import { PersistQueryClientProvider } from '@tanstack/react-query-persist-client';
import { ApiError } from '../lib/api';
import { PERSIST_BUSTER, PERSIST_MAX_AGE_MS, persister, shouldPersist } from '../lib/persist';

// A 4xx answer will not change by asking again; network trouble and 5xx get two more tries.
function retry(failureCount: number, error: unknown): boolean {
  if (error instanceof ApiError && error.status >= 400 && error.status < 500) return false;
  return failureCount < 2;
}

export const queryClient = new QueryClient({
  defaultOptions: {
    queries: {
      retry,
      // Kept in memory as long as on the phone, or a restored copy would be dropped at once.
      gcTime: PERSIST_MAX_AGE_MS,
      // Try once even when the phone says it is offline (it is often wrong in a field); then
      // pause retries until the signal is back, showing what is on the phone meanwhile.
      networkMode: 'offlineFirst',
    },
    mutations: { retry: false },
  },
});

export function Providers({ children }: { children: ReactNode }) {
  return (
    <PersistQueryClientProvider
      client={queryClient}
      persistOptions={{
        persister,
        maxAge: PERSIST_MAX_AGE_MS,
        buster: PERSIST_BUSTER,
        dehydrateOptions: { shouldDehydrateQuery: shouldPersist },
      }}
    >
      {children}
    </PersistQueryClientProvider>
  );
}
