import { values } from 'idb-keyval';
import { draftStore } from '../../lib/storage';
import type { WalkDraft } from './drafts';

/** A sampler's walks in progress, newest first (Today and the plan; apart from drafts.ts so the
 *  first screen does not carry the draft writer). */
export async function listDrafts(userId: string): Promise<WalkDraft[]> {
  const all = await values<WalkDraft>(draftStore());
  return all.filter((d) => d.userId === userId).sort((a, b) => b.updatedAt - a.updatedAt);
}
