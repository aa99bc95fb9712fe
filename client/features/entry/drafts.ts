import { del, get, set } from 'idb-keyval';
import { draftStore } from '../../lib/storage';
import type { LengthUnit } from './validation';

/**
 * A walk in progress, kept in IndexedDB and rewritten on every keystroke, so a closed tab, a
 * reload or a dead battery loses nothing. Keyed by the walk's client-made id.
 */

export interface DraftPlanting {
  plantingId: string;
  fieldName: string;
  ranchName: string;
  crop: string;
  variety: string | null;
  calibrationId: string | null;
  areaHa: number;
}

export interface WalkDraft {
  v: 1;
  id: string;
  userId: string;
  planting: DraftPlanting;
  /** The unit the lengths are typed in (the user's units when the walk started). */
  unit: LengthUnit;
  walkedOn: string;
  startedAt: number;
  updatedAt: number;
  stopCount: number;
  /** The stop on screen (1-based). */
  current: number;
  /** The text typed per stop, exactly as typed. */
  values: Record<number, string>;
  /** Questioned values the sampler confirmed: the text they confirmed. */
  confirmed: Record<number, string>;
  positions: Record<number, { lat: number; lon: number; accuracyM: number }>;
  /** Stops the sampler chose to skip after being asked (absent in drafts from older versions). */
  skipped?: number[];
  photos: Record<number, { key: string; size: number; type: string }>;
  stage: string | null;
  notes: string;
  /** The walk plan's seed: the same seed draws the same stops (absent in drafts from older versions). */
  planSeed?: string;
}

export const DEFAULT_STOPS = 10;

export function newDraft(input: {
  id: string;
  userId: string;
  planting: DraftPlanting;
  unit: LengthUnit;
  walkedOn: string;
  now: number;
  /** The rule's minimum plants; DEFAULT_STOPS when not given. */
  stopCount?: number;
  planSeed?: string;
}): WalkDraft {
  return {
    v: 1,
    id: input.id,
    userId: input.userId,
    planting: input.planting,
    unit: input.unit,
    walkedOn: input.walkedOn,
    startedAt: input.now,
    updatedAt: input.now,
    stopCount: input.stopCount ?? DEFAULT_STOPS,
    current: 1,
    values: {},
    confirmed: {},
    positions: {},
    photos: {},
    stage: null,
    notes: '',
    ...(input.planSeed ? { planSeed: input.planSeed } : {}),
  };
}

// --- IndexedDB -------------------------------------------------------------------------------

const memory = new Map<string, WalkDraft>();
const writing = new Map<string, Promise<void>>();
const latest = new Map<string, WalkDraft>();

export async function loadDraft(id: string): Promise<WalkDraft | null> {
  const inMemory = memory.get(id);
  if (inMemory) return inMemory;
  const stored = await get<WalkDraft>(id, draftStore());
  if (stored) memory.set(id, stored);
  return stored ?? null;
}

/**
 * Writes a draft. Writes to one draft never overlap: while one is in flight only the newest
 * state waits, so fast typing costs one write at a time and the last keystroke always lands.
 */
export function saveDraft(draft: WalkDraft): Promise<void> {
  memory.set(draft.id, draft);
  latest.set(draft.id, draft);
  const inFlight = writing.get(draft.id);
  if (inFlight) return inFlight.then(() => flush(draft.id));
  return flush(draft.id);
}

function flush(id: string): Promise<void> {
  const existing = writing.get(id);
  if (existing) return existing;
  const next = latest.get(id);
  if (!next) return Promise.resolve();
  latest.delete(id);
  const p = set(id, next, draftStore()).finally(() => {
    writing.delete(id);
  });
  writing.set(id, p);
  return p.then(() => (latest.has(id) ? flush(id) : undefined));
}

export async function removeDraft(id: string): Promise<void> {
  await (writing.get(id) ?? Promise.resolve()).catch(() => undefined);
  latest.delete(id);
  memory.delete(id);
  await del(id, draftStore());
}
