import { newWalkSeed } from '../../../shared/calc/walk-plan';

/**
 * The seed of a walk plan not yet started: drawn once per planting and kept on the phone, so the
 * plan looks the same each time it is opened until the sampler re-draws it or starts the walk
 * (the draft then keeps it and sends it with the walk).
 */
const key = (userId: string, plantingId: string) => `crowntip.planSeed.${userId}.${plantingId}`;

export function pendingSeed(userId: string, plantingId: string): string {
  try {
    const kept = globalThis.localStorage?.getItem(key(userId, plantingId));
    if (kept) return kept;
  } catch {
    // storage off: a fresh seed for this visit
  }
  return setPendingSeed(userId, plantingId, newWalkSeed());
}

export function setPendingSeed(userId: string, plantingId: string, seed: string): string {
  try {
    globalThis.localStorage?.setItem(key(userId, plantingId), seed);
  } catch {
    // kept for this visit only
  }
  return seed;
}

export function clearPendingSeed(userId: string, plantingId: string): void {
  try {
    globalThis.localStorage?.removeItem(key(userId, plantingId));
  } catch {
    // nothing kept
  }
}
