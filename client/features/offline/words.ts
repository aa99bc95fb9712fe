import type { TextFunction } from '../../lib/i18n';
import { isWalkJob, type QueueJob } from './jobs';

/**
 * What some of the outbox's jobs are, in words: "2 walks", "1 field outline", or both, "2 walks and
 * 1 field outline" (a traced boundary goes through the same outbox as the walks).
 */
export function whatWaits(t: TextFunction, jobs: readonly QueueJob[]): string {
  const walks = jobs.filter(isWalkJob).length;
  const outlines = jobs.length - walks;
  if (outlines === 0) return t('queue.walks', { count: walks });
  if (walks === 0) return t('queue.outlines', { count: outlines });
  return t('queue.walksAndOutlines', { walks: t('queue.walks', { count: walks }), outlines: t('queue.outlines', { count: outlines }) });
}
