import type { WalkCreate } from '../../../shared/schemas/walks';
import type { WalkDraft } from './drafts';
import { checkLength, isAccepted, type LengthCheck } from './validation';

/** A walk in progress seen through the entry checks: what counts, what waits, what would be sent. */

export interface StopState {
  stop: number;
  text: string;
  check: LengthCheck;
  accepted: boolean;
}

/** Every stop's check; the outlier test of a stop compares with the usable lengths of the others. */
export function stopStates(draft: WalkDraft): StopState[] {
  const parsed: Array<{ stop: number; cm: number | null }> = [];
  for (let stop = 1; stop <= draft.stopCount; stop++) {
    const c = checkLength(draft.values[stop] ?? '', draft.unit, []);
    parsed.push({ stop, cm: c.kind === 'ok' || c.kind === 'question' ? c.lengthCm : null });
  }
  return parsed.map(({ stop }) => {
    const text = draft.values[stop] ?? '';
    const others = parsed.filter((p) => p.stop !== stop && p.cm !== null).map((p) => p.cm as number);
    const check = checkLength(text, draft.unit, others);
    return { stop, text, check, accepted: isAccepted(check, draft.confirmed[stop], text) };
  });
}

/**
 * A length as stored: to 0.01 cm, far below what a tape can show; it keeps the stored number tidy.
 * The live estimate uses the same rounded values, so the phone and the server compute from the
 * very same numbers.
 */
export const roundCm = (cm: number) => Math.round(cm * 100) / 100;

/** Lengths (cm) that count for the live estimate: accepted ones, in stop order, as they will be sent. */
export function acceptedLengthsCm(states: StopState[]): number[] {
  return states.flatMap((s) => (s.accepted && (s.check.kind === 'ok' || s.check.kind === 'question') ? [roundCm(s.check.lengthCm)] : []));
}

export interface DraftReview {
  body: WalkCreate;
  /** Stops with a refused or unconfirmed questioned value: sending waits for them. */
  needCheck: number[];
  /** Stops left empty without being skipped: left out of the walk. */
  empty: number[];
  /** Stops the sampler chose to skip (sent with the walk as skipped). */
  skipped: number[];
}

/** A stop counts as skipped while it is still empty; typing a length there takes the skip back. */
export function isSkipped(draft: WalkDraft, stop: number): boolean {
  return (draft.skipped ?? []).includes(stop) && (draft.values[stop] ?? '').trim() === '';
}

/** What would be sent, in SI units (cm), and what stands in the way. */
export function reviewDraft(draft: WalkDraft, states = stopStates(draft)): DraftReview {
  const plants: WalkCreate['plants'] = [];
  const needCheck: number[] = [];
  const empty: number[] = [];
  const skipped: number[] = [];
  for (const s of states) {
    if (s.check.kind === 'empty') (isSkipped(draft, s.stop) ? skipped : empty).push(s.stop);
    else if (!s.accepted || s.check.kind === 'refused') needCheck.push(s.stop);
    else {
      const pos = draft.positions[s.stop];
      plants.push({
        stop: s.stop,
        lengthCm: roundCm(s.check.lengthCm),
        ...(pos ? { lat: pos.lat, lon: pos.lon } : {}),
      });
    }
  }
  const notes = draft.notes.trim();
  return {
    body: {
      id: draft.id,
      plantingId: draft.planting.plantingId,
      walkedOn: draft.walkedOn,
      stage: draft.stage,
      notes: notes === '' ? null : notes,
      plants,
      ...(skipped.length > 0 ? { skippedStops: skipped } : {}),
      ...(draft.planSeed ? { planSeed: draft.planSeed, planStops: draft.stopCount } : {}),
    },
    needCheck,
    empty,
    skipped,
  };
}

