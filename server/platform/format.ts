import { haToAc, kgPerHaToLbPerAc } from '../../shared/calc/units';
import type { Units } from '../../shared/schemas/session';
import { date, dateTime, formatNumber, TIME_ZONE } from '../../shared/format/figures';

/**
 * Numbers and dates as one user reads them: their units (SI is what is stored), and dates in
 * Spanish when the browser prefers it. Both are written by the one shared formatter
 * (shared/format/figures.ts: "4,495.8", "Dec 2, 2026" or "2 dic 2026"), as the PDF, CSV and phone write them.
 */
export interface Formatter {
  units: Units;
  areaUnit: string;
  rateUnit: string;
  area: (ha: number | null | undefined, digits?: number) => string;
  areaValue: (ha: number | null | undefined) => string;
  rate: (kgHa: number | null | undefined) => string;
  rateValue: (kgHa: number | null | undefined) => string;
  date: (iso: string | null | undefined) => string;
  /** A stored instant with its time and zone, "Dec 2, 2026, 14:05 UTC" (shared/format: one writing everywhere). */
  dateTime: (iso: string | null | undefined) => string;
  /** The zone dateTime writes in. */
  timeZone: string;
  number: (n: number, digits?: number) => string;
}

const SUPPORTED = ['en-US', 'en-GB', 'en-AU', 'en-CA', 'es-MX', 'es-ES', 'es-US', 'en', 'es'];

const cache = new Map<string, Formatter>();

/** One formatter per units and locale, made once. */
export function makeFormatter(units: Units, acceptLanguage: string | false): Formatter {
  const key = `${units}|${acceptLanguage || ''}`;
  let f = cache.get(key);
  if (!f) {
    f = buildFormatter(units, acceptLanguage);
    cache.set(key, f);
  }
  return f;
}

function buildFormatter(units: Units, acceptLanguage: string | false): Formatter {
  const lang = acceptLanguage && acceptLanguage.startsWith('es') ? 'es' : 'en';
  const areaOf = (ha: number) => (units === 'us' ? haToAc(ha) : ha);
  const rateOf = (kg: number) => (units === 'us' ? kgPerHaToLbPerAc(kg) : kg);
  return {
    units,
    areaUnit: units === 'us' ? 'ac' : 'ha',
    rateUnit: units === 'us' ? 'lb/ac' : 'kg/ha',
    area: (ha, digits = 1) => (ha == null ? '—' : `${formatNumber(areaOf(ha), digits)} ${units === 'us' ? 'ac' : 'ha'}`),
    // Plain numbers for form inputs: dot decimals whatever the locale, as <input type=number> wants.
    areaValue: (ha) => (ha == null ? '' : String(Math.round(areaOf(ha) * 1000) / 1000)),
    rate: (kg) => (kg == null ? '—' : `${formatNumber(rateOf(kg))} ${units === 'us' ? 'lb/ac' : 'kg/ha'}`),
    rateValue: (kg) => (kg == null ? '' : String(Math.round(rateOf(kg) * 10) / 10)),
    // A stored timestamp is shown by its UTC calendar day, as before.
    date: (iso) => (iso ? date(iso.slice(0, 10), lang) : '—'),
    number: (n, digits = 0) => formatNumber(n, digits),
    dateTime: (iso) => dateTime(iso, 'en', TIME_ZONE),
    timeZone: TIME_ZONE,
  };
}

export const pickLocale = (accepts: (langs: string[]) => string | false) => accepts(SUPPORTED);
