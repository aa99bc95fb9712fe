import { acToHa, lbPerAcToKgPerHa } from '../../shared/calc/units';
import type { Units } from './user';

/**
 * Office forms speak the user's units and plain text; the shared schemas speak SI and
 * JSON. These turn one into the other, and name schema errors after the form's inputs.
 */
const blankToNull = (v: unknown) => (typeof v === 'string' && v.trim() === '' ? null : v);

/** A typed number, or the raw text so the schema reports "enter a number". */
export function numberOrText(v: unknown): number | string | null {
  const s = blankToNull(v);
  if (s === null || s === undefined) return null;
  const n = Number(String(s).replace(',', '.'));
  return Number.isFinite(n) ? n : String(s);
}

export function areaToHa(v: unknown, units: Units): number | string | null {
  const n = numberOrText(v);
  return typeof n === 'number' ? (units === 'us' ? acToHa(n) : n) : n;
}

export function rateToKgHa(v: unknown, units: Units): number | string | null {
  const n = numberOrText(v);
  return typeof n === 'number' ? (units === 'us' ? lbPerAcToKgPerHa(n) : n) : n;
}
