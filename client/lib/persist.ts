import { createAsyncStoragePersister } from '@tanstack/query-async-storage-persister';
import { del, get, set } from 'idb-keyval';
import { cacheStore } from './storage';

/**
 * TanStack Query persistence into IndexedDB (idb-keyval), so that the session, today's list, the
 * published calibrations, the credit rule and stored walk results are on the phone when the
 * signal is not: the live estimate works offline with the calibration fetched earlier.
 */
const KEY = 'capture-queries';
export const PERSIST_MAX_AGE_MS = 7 * 24 * 3600_000;
/** Bump when a persisted shape changes, so an old copy is dropped instead of misread. */
export const PERSIST_BUSTER = 'capture-1';

/** Only these queries are kept (walks in progress have their own store). */
const PERSISTED_ROOTS = new Set(['session', 'today', 'calibrations', 'rules', 'walks']);

export const persister = createAsyncStoragePersister({
  storage: {
    getItem: (key: string) => get<string>(key, cacheStore()).then((v) => v ?? null),
    setItem: (key: string, value: string) => set(key, value, cacheStore()),
    removeItem: (key: string) => del(key, cacheStore()),
  },
  key: KEY,
  throttleTime: 500,
  serialize: (client) => JSON.stringify(keptOnPhone(client)),
});

interface QueryStateLike {
  status: string;
  data?: unknown;
  error?: unknown;
}

/** The server's own answer that the session is over; network trouble and 5xx are not. */
function signedOut(error: unknown): boolean {
  return (error as { status?: unknown } | null)?.status === 401;
}

// Typed structurally: the persister packages pin their own query-core patch version (vite.config.ts
// dedupes them to one copy at build time), so the nominal Query types differ by a patch release.
/**
 * A listed query is kept while it has an answer, even when the last refetch failed: without signal
 * every refetch fails, and dropping the answer then locked the app on the next load. Only the
 * server saying the session is over (401) drops it.
 */
export function shouldPersist(query: { state: QueryStateLike; queryKey: readonly unknown[] }): boolean {
  if (!PERSISTED_ROOTS.has(String(query.queryKey[0]))) return false;
  if (signedOut(query.state.error)) return false;
  return query.state.data !== undefined;
}

/**
 * What is written to the phone: a query whose refetch failed is kept as its last answer (not as
 * the failure), so the next load starts from that answer and simply tries the server again.
 */
export function keptOnPhone<C extends { clientState: { queries: Array<{ state: QueryStateLike }> } }>(client: C): C {
  return {
    ...client,
    clientState: {
      ...client.clientState,
      queries: client.clientState.queries.map((q) =>
        q.state.status === 'error' && q.state.data !== undefined
          ? { ...q, state: { ...q.state, status: 'success', error: null, fetchFailureCount: 0, fetchFailureReason: null } }
          : q,
      ),
    },
  };
}

export async function clearPersistedCache(): Promise<void> {
  try {
    await del(KEY, cacheStore());
  } catch {
    // no IndexedDB (private mode): nothing was kept
  }
}
