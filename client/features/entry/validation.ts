import { MAX_LENGTH_CM } from '../../../shared/schemas/walks';
import { OUTLIER_MIN_N, outlierIndexes } from '../../../shared/calc/outliers';

/**
 * Checks one main shoot length as the sampler types it. Pure (no DOM, no React) so it is
 * table-tested in tests/client/entry-validation.test.ts.
 *
 * Three outcomes besides "empty":
 * - refused: not a number, zero or less, or above MAX_LENGTH_CM (the server refuses these too);
 * - question: plausible enough to keep but worth a second look; the sampler confirms or corrects;
 * - ok.
 */

export type LengthUnit = 'in' | 'cm';

/** Above this a cereal main shoot is very tall: ask, do not refuse (a typing slip is likelier than such a plant). */
export const QUESTION_ABOVE_CM = 250;
/** The outlier test starts once this many other plants are measured (the shared rule's 4 plants in all). */
export const OUTLIER_MIN_OTHERS = OUTLIER_MIN_N - 1;

export type RefuseReason = 'not_number' | 'not_positive' | 'too_long';
export type QuestionReason = 'very_long' | 'far_from_others';

export type LengthCheck =
  | { kind: 'empty' }
  | { kind: 'refused'; reason: RefuseReason; maxInUnit: number }
  | { kind: 'question'; lengthCm: number; reasons: QuestionReason[]; medianCm: number | null }
  | { kind: 'ok'; lengthCm: number };

const NUMBER = /^[+-]?(\d+([.,]\d*)?|[.,]\d+)$/;

/**
 * The typed text as a number in its own unit. Accepts a decimal comma (Spanish keyboards and
 * habits: "31,5") as well as a point; no thousands separators (no shoot is 1,000 of anything).
 * Returns null for empty text and NaN for anything else that is not a plain number.
 */
export function parseLength(text: string): number | null {
  const t = text.trim();
  if (t === '') return null;
  if (!NUMBER.test(t)) return Number.NaN;
  return Number(t.replace(',', '.'));
}

export function toCm(value: number, unit: LengthUnit): number {
  return unit === 'in' ? value * 2.54 : value;
}

export function fromCm(cm: number, unit: LengthUnit): number {
  return unit === 'in' ? cm / 2.54 : cm;
}

export function median(values: readonly number[]): number {
  const s = [...values].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m]! : (s[m - 1]! + s[m]!) / 2;
}

/**
 * Is `x` far from the `others`? The one outlier rule of the phone and the office review
 * (shared/calc/outliers.ts: modified z-score above 3.5 among all the plants, from 4 plants on), so
 * the plant questioned here is the plant flagged in review.
 */
export function isFarFromOthers(xCm: number, othersCm: readonly number[]): boolean {
  if (othersCm.length < OUTLIER_MIN_OTHERS) return false;
  return outlierIndexes([...othersCm, xCm]).includes(othersCm.length);
}

/** Checks the text typed for one stop against the lengths already entered at the other stops (cm). */
export function checkLength(text: string, unit: LengthUnit, othersCm: readonly number[]): LengthCheck {
  const maxInUnit = Math.floor(fromCm(MAX_LENGTH_CM, unit) * 10) / 10;
  const value = parseLength(text);
  if (value === null) return { kind: 'empty' };
  if (!Number.isFinite(value)) return { kind: 'refused', reason: 'not_number', maxInUnit };
  if (value <= 0) return { kind: 'refused', reason: 'not_positive', maxInUnit };
  const lengthCm = toCm(value, unit);
  if (lengthCm > MAX_LENGTH_CM + 1e-9) return { kind: 'refused', reason: 'too_long', maxInUnit };

  const reasons: QuestionReason[] = [];
  if (lengthCm > QUESTION_ABOVE_CM) reasons.push('very_long');
  if (isFarFromOthers(lengthCm, othersCm)) reasons.push('far_from_others');
  if (reasons.length > 0) {
    return { kind: 'question', lengthCm, reasons, medianCm: othersCm.length ? median(othersCm) : null };
  }
  return { kind: 'ok', lengthCm };
}

/** A questioned value counts once the sampler confirmed exactly this text. */
export function isAccepted(check: LengthCheck, confirmedText: string | undefined, text: string): boolean {
  if (check.kind === 'ok') return true;
  return check.kind === 'question' && confirmedText !== undefined && confirmedText.trim() === text.trim();
}
