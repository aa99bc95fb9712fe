import { acToHa, lbPerAcToKgPerHa } from '../../shared/calc/units';
import { boundaryFromGeoJson, type Boundary } from '../../shared/registry/boundary';
import type { Units } from '../people/db';

/**
 * Office registry forms speak the user's units and plain text; the shared schemas speak SI and
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

export const FORM_NAME_OF: Record<string, string> = { areaHa: 'area', seedingRateKgHa: 'seedingRate' };

export function renameErrors(fields: Record<string, string> | undefined): Record<string, string> {
  const out: Record<string, string> = {};
  for (const [k, v] of Object.entries(fields ?? {})) {
    const top = k.split('.')[0];
    out[FORM_NAME_OF[top] ?? top] ??= v;
  }
  return out;
}

/** The uploaded GeoJSON file, if any: the geometry, or a problem to show beside the input. */
export function boundaryFromUpload(file: Express.Multer.File | undefined): { boundary?: Boundary; problem?: string } {
  if (!file || file.size === 0) return {};
  let json: unknown;
  try {
    json = JSON.parse(file.buffer.toString('utf8').replace(/^\uFEFF/, ''));
  } catch {
    return { problem: 'The boundary file is not valid GeoJSON (it could not be read as JSON).' };
  }
  const result = boundaryFromGeoJson(json);
  return result.ok ? { boundary: result.boundary } : { problem: result.problem };
}
