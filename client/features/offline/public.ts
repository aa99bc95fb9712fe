import { useSyncExternalStore } from 'react';
import type { Queue, newJob } from './queue';
import { newBoundaryJob, type QueueJob } from './jobs';

/**
 * The outbox as the screens see it (what other features may use of offline/). The sending engine (outbox.ts) loads right after the first
 * screen has drawn, so it is not part of the first screen's code; until then the outbox reads as
 * empty for a moment.
 */

let engine: Promise<Queue> | null = null;
let jobs: QueueJob[] = [];
let sending: string | null = null;
const listeners = new Set<() => void>();

export function loadOutbox(): Promise<Queue> {
  engine ??= import('./outbox').then(({ outbox }) => {
    const copy = () => {
      jobs = outbox.snapshot();
      sending = outbox.sendingId();
      for (const l of listeners) l();
    };
    outbox.subscribe(copy);
    void outbox.load().then(copy);
    return outbox;
  });
  return engine;
}

function subscribe(l: () => void) {
  listeners.add(l);
  return () => {
    listeners.delete(l);
  };
}

export function useQueueJobs(): QueueJob[] {
  return useSyncExternalStore(subscribe, () => jobs, () => jobs);
}

export function useSendingId(): string | null {
  return useSyncExternalStore(subscribe, () => sending, () => sending);
}

const subscribeOnline = (cb: () => void) => {
  window.addEventListener('online', cb);
  window.addEventListener('offline', cb);
  return () => {
    window.removeEventListener('online', cb);
    window.removeEventListener('offline', cb);
  };
};

/** The phone's own idea of the signal (a hint only; sending is what really tells). */
export function useOnline(): boolean {
  return useSyncExternalStore(subscribeOnline, () => navigator.onLine, () => true);
}

export type { QueueJob, WalkJob, BoundaryJob } from './jobs';
export { isWalkJob } from './jobs';

/** Puts a finished walk in the outbox (saved there when this resolves); the engine loads first if it has not. */
export async function enqueueWalk(input: Parameters<typeof newJob>[0]): Promise<void> {
  const outbox = await loadOutbox();
  const engine = await import('./outbox'); // already loaded by loadOutbox
  await outbox.enqueue(engine.newJob(input));
}

/** Hands a traced boundary to the outbox: saved on the phone at once, sent when there is signal. */
export async function sendBoundary(input: Parameters<typeof newBoundaryJob>[0]): Promise<void> {
  const outbox = await loadOutbox();
  await outbox.enqueue(newBoundaryJob(input));
}
