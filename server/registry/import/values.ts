import { isSeason } from '../../../shared/registry/season';
import { ranchInputSchema } from '../../../shared/schemas/registry';

// 3. Values -----------------------------------------------------------------------------------

/**
 * A plain number. A semicolon-separated file may use a decimal comma ("12,5"); a comma-separated
 * one may group thousands ("1,250.5", quoted in the file). Anything else (units, text) is null.
 */
export function parseNumber(raw: string, delimiter: ',' | ';'): number | null {
  let s = raw.trim();
  if (delimiter === ';' && /^[+-]?\d+,\d+$/.test(s)) s = s.replace(',', '.');
  else if (delimiter === ',' && /^[+-]?\d{1,3}(,\d{3})+(\.\d+)?$/.test(s)) s = s.replace(/,/g, '');
  if (!/^[+-]?(\d+\.?\d*|\.\d+)$/.test(s)) return null;
  return Number(s);
}

const isRealDate = (y: number, m: number, d: number) => {
  const t = new Date(Date.UTC(y, m - 1, d));
  return t.getUTCFullYear() === y && t.getUTCMonth() === m - 1 && t.getUTCDate() === d;
};
const pad2 = (n: number) => String(n).padStart(2, '0');

/** ISO dates only (a time after the date is dropped); other forms get a message that says how to write it. */
export function parseDate(raw: string): { ok: true; value: string } | { ok: false; message: string } {
  const s = raw.trim();
  const iso = /^(\d{4})-(\d{1,2})-(\d{1,2})(?:[T ]\d{1,2}:\d{2}(?::\d{2}(?:\.\d+)?)?Z?)?$/.exec(s);
  if (iso) {
    const [y, m, d] = [Number(iso[1]), Number(iso[2]), Number(iso[3])];
    if (isRealDate(y, m, d)) return { ok: true, value: `${iso[1]}-${pad2(m)}-${pad2(d)}` };
    return { ok: false, message: `“${s}” is not a date in the calendar.` };
  }
  const slash = /^(\d{1,2})[/.](\d{1,2})[/.](\d{4})$/.exec(s);
  if (slash) {
    const [a, b, y] = [Number(slash[1]), Number(slash[2]), slash[3]];
    if (a <= 12 && b > 12 && isRealDate(Number(y), a, b)) {
      return { ok: false, message: `Write dates as YYYY-MM-DD: “${s}” looks like month/day/year, which is ${y}-${pad2(a)}-${pad2(b)}.` };
    }
    if (a > 12 && b <= 12 && isRealDate(Number(y), b, a)) {
      return { ok: false, message: `Write dates as YYYY-MM-DD: “${s}” looks like day/month/year, which is ${y}-${pad2(b)}-${pad2(a)}.` };
    }
    return { ok: false, message: `Write dates as YYYY-MM-DD: “${s}” could be read as month/day or day/month.` };
  }
  return { ok: false, message: `“${s}” is not a date. Write dates as YYYY-MM-DD, e.g. 2026-10-14.` };
}

/** "2026-27", also written "2026–27", "2026/27" or "2026-2027". */
export function parseSeason(raw: string): string | null {
  const s = raw.trim().replace(/[\u2010-\u2015/]/g, '-');
  const long = /^(\d{4})-(\d{4})$/.exec(s);
  const season = long && Number(long[2]) === Number(long[1]) + 1 ? `${long[1]}-${long[2]!.slice(2)}` : s;
  return isSeason(season) ? season : null;
}

export interface CropOption {
  code: string;
  label: string;
}

const cropKey = (s: string) => s.trim().toLowerCase().replace(/[\s_-]+/g, ' ');
// A few names people write for the listed crops.
const CROP_SYNONYMS: Record<string, string> = { rye: 'cereal_rye', 'winter rye': 'cereal_rye', oat: 'oats', 'winter wheat': 'wheat' };

/** Crop codes and labels, case and spacing aside: "Cereal rye", "CEREAL_RYE", "cereal-rye" → cereal_rye. */
export function cropMatcher(crops: readonly CropOption[]): (raw: string) => string | null {
  const byKey = new Map<string, string>();
  for (const c of crops) {
    byKey.set(cropKey(c.code), c.code);
    byKey.set(cropKey(c.label), c.code);
  }
  for (const [name, code] of Object.entries(CROP_SYNONYMS)) if (crops.some((c) => c.code === code) && !byKey.has(name)) byKey.set(name, code);
  return (raw) => byKey.get(cropKey(raw)) ?? null;
}

export const ranchNameSchema = ranchInputSchema.pick({ name: true });
export const nameKey = (s: string) => s.trim().replace(/\s+/g, ' ').toLowerCase();
