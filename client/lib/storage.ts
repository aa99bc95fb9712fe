import { createStore, type UseStore } from 'idb-keyval';

/**
 * The phone's own storage, in IndexedDB through idb-keyval: one small database per purpose, so
 * clearing one (the query cache at sign-out) never touches another (walks in progress, the outbox).
 * Opened on first use only, so importing this module costs nothing (and works in tests).
 */
function lazyStore(db: string, store: string): () => UseStore {
  let s: UseStore | null = null;
  return () => (s ??= createStore(db, store));
}

/** TanStack Query's persisted cache (today's list, calibrations, rules, the session). */
export const cacheStore = lazyStore('crowntip-cache', 'queries');
/** Walks in progress, keyed by walk id; written on every keystroke. */
export const draftStore = lazyStore('crowntip-drafts', 'drafts');
/** Compressed photos (Blobs), keyed `${walkId}:${stop}`, until their walk is sent. */
export const photoStore = lazyStore('crowntip-photos', 'photos');
/** Boundaries being traced, keyed `${userId}:${fieldId}`; written at every position kept. */
export const traceStore = lazyStore('crowntip-traces', 'traces');
/** The outbox of finished walks (features/offline). */
export const queueStore = lazyStore('crowntip-queue', 'jobs');

export const photoKey = (walkId: string, stop: number) => `${walkId}:${stop}`;

/**
 * A walk id made on the phone. crypto.randomUUID needs a secure context (HTTPS or localhost); on a
 * plain-HTTP farm network address it is missing, so fall back to a v4 UUID from getRandomValues.
 */
export function newWalkId(): string {
  if (typeof crypto.randomUUID === 'function') return crypto.randomUUID();
  const b = crypto.getRandomValues(new Uint8Array(16));
  b[6] = (b[6]! & 0x0f) | 0x40;
  b[8] = (b[8]! & 0x3f) | 0x80;
  const h = [...b].map((x) => x.toString(16).padStart(2, '0')).join('');
  return `${h.slice(0, 8)}-${h.slice(8, 12)}-${h.slice(12, 16)}-${h.slice(16, 20)}-${h.slice(20)}`;
}
