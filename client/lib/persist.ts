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
});

// Typed structurally: the persister packages pin their own query-core patch version (vite.config.ts
// dedupes them to one copy at build time), so the nominal Query types differ by a patch release.
export function shouldPersist(query: { state: { status: string }; queryKey: readonly unknown[] }): boolean {
  return query.state.status === 'success' && PERSISTED_ROOTS.has(String(query.queryKey[0]));
}

export async function clearPersistedCache(): Promise<void> {
  try {
    await del(KEY, cacheStore());
  } catch {
    // no IndexedDB (private mode): nothing was kept
  }
}
