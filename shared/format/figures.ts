import { parseIsoDate } from '../calc/dates';
import { CM_PER_IN, HA_PER_ACRE, KG_PER_LB } from '../calc/units';

/*
 * One formatter for every figure a person reads (phone, office pages, PDF, CSV, e-mail). Values
 * arrive in SI (cm, kg/ha, ha, kg N) and leave in the reader's units, with the same rounding
 * everywhere. Hand-rolled rather than Intl, so the server and every phone produce the same characters
 * whatever locale data they carry. English (en-US) and Spanish (es-MX) write numbers alike:
 * 4,495.8 (comma thousands, point decimals).
 */

export type Lang = 'en' | 'es';
export type UnitSystem = 'us' | 'metric';

/** A figure ready to show: the number in display units, how it was rounded, and its text. */
export interface Figure {
  /** Unrounded, in display units. */
  value: number;
  /** Rounded to `decimals`, in display units. */
  rounded: number;
  decimals: number;
  /** The number alone, e.g. "4,496". */
  text: string;
  /** The unit symbol, e.g. "lb/ac" (the same in both languages). */
  unit: string;
  /** Number and unit, e.g. "4,496 lb/ac". */
  full: string;
}

/** The rounding of each kind of figure, one place for all outputs. */
export const DECIMALS = { biomass: 0, length: 1, area: 1, nitrogenRate: 0, nitrogen: 0, percent: 0 } as const;

function roundTo(v: number, decimals: number): number {
  // Half away from zero on the decimal text of v (toFixed rounds the binary value: 1.005 → "1.00").
  const a = String(Math.abs(v));
  const r = a.includes('e')
    ? Math.round(Math.abs(v) * 10 ** decimals) / 10 ** decimals
    : Number(`${Math.round(Number(`${a}e${decimals}`))}e-${decimals}`);
  return v < 0 ? -r : r;
}

/** v to `decimals` decimals with thousands separators: 5043.83 → "5,044". */
export function formatNumber(v: number, decimals = 0, _lang: Lang = 'en'): string {
  if (!Number.isFinite(v)) return '—';
  const r = roundTo(v, decimals);
  const neg = r < 0 ? '-' : '';
  const [int = '', frac] = Math.abs(r).toFixed(decimals).split('.');
  const grouped = int.replace(/\B(?=(\d{3})+(?!\d))/g, ',');
  return neg + grouped + (frac ? `.${frac}` : '');
}

/**
 * v to at most `maxDecimals` decimals, trailing zeros dropped, thousands separators: 1234.5 →
 * "1,234.5", 2.004 → "2", 0.125 → "0.13" (2 decimals). For figures a person typed or may type back,
 * where "10.50" would read as more precise than what was written. Whole counts need no function
 * of their own: formatNumber(n) writes 12345 as "12,345".
 */
export function formatUpTo(v: number, maxDecimals = 2, lang: Lang = 'en'): string {
  const text = formatNumber(v, maxDecimals, lang);
  return text.includes('.') ? text.replace(/\.?0+$/, '') : text;
}

function figure(value: number, decimals: number, unit: string, lang: Lang): Figure {
  const text = formatNumber(value, decimals, lang);
  return { value, rounded: roundTo(value, decimals), decimals, text, unit, full: `${text} ${unit}` };
}

const toLbPerAc = (kgHa: number) => (kgHa * HA_PER_ACRE) / KG_PER_LB;

/** Biomass from kg/ha: lb/ac or kg/ha, whole units. */
export function biomass(kgHa: number, units: UnitSystem, lang: Lang = 'en', decimals: number = DECIMALS.biomass): Figure {
  return units === 'us' ? figure(toLbPerAc(kgHa), decimals, 'lb/ac', lang) : figure(kgHa, decimals, 'kg/ha', lang);
}

/** Main shoot length from cm: in or cm, one decimal. */
export function length(cm: number, units: UnitSystem, lang: Lang = 'en'): Figure {
  return units === 'us' ? figure(cm / CM_PER_IN, DECIMALS.length, 'in', lang) : figure(cm, DECIMALS.length, 'cm', lang);
}

/** Field area from ha: ac or ha, one decimal. */
export function area(ha: number, units: UnitSystem, lang: Lang = 'en'): Figure {
  return units === 'us' ? figure(ha / HA_PER_ACRE, DECIMALS.area, 'ac', lang) : figure(ha, DECIMALS.area, 'ha', lang);
}

/** Nitrogen per area from kg N/ha (credit rate, N in the shoots): lb N/ac or kg N/ha, whole units. */
export function nitrogenRate(kgNPerHa: number, units: UnitSystem, lang: Lang = 'en'): Figure {
  return units === 'us' ? figure(toLbPerAc(kgNPerHa), DECIMALS.nitrogenRate, 'lb N/ac', lang) : figure(kgNPerHa, DECIMALS.nitrogenRate, 'kg N/ha', lang);
}

/** A field's nitrogen credit from kg N: lb N or kg N, whole units. */
export function credit(kgN: number, units: UnitSystem, lang: Lang = 'en'): Figure {
  return units === 'us' ? figure(kgN / KG_PER_LB, DECIMALS.nitrogen, 'lb N', lang) : figure(kgN, DECIMALS.nitrogen, 'kg N', lang);
}

/** A fraction as a percentage: 0.9 → "90%" (en), "90 %" (es). */
export function percent(fraction: number, lang: Lang = 'en', decimals: number = DECIMALS.percent): string {
  return `${formatNumber(fraction * 100, decimals, lang)}${lang === 'es' ? ' %' : '%'}`;
}

const MONTHS: Record<Lang, string[]> = {
  en: ['Jan', 'Feb', 'Mar', 'Apr', 'May', 'Jun', 'Jul', 'Aug', 'Sep', 'Oct', 'Nov', 'Dec'],
  es: ['ene', 'feb', 'mar', 'abr', 'may', 'jun', 'jul', 'ago', 'sep', 'oct', 'nov', 'dic'],
};

/** 'YYYY-MM-DD' → "Dec 2, 2026" (en) or "2 dic 2026" (es). The date is a calendar day: no time zone. */
export function date(iso: string, lang: Lang = 'en'): string {
  parseIsoDate(iso, 'date');
  const [y = 0, m = 0, d = 0] = iso.split('-').map(Number);
  const mon = MONTHS[lang][m - 1];
  return lang === 'es' ? `${d} ${mon} ${y}` : `${mon} ${d}, ${y}`;
}

/**
 * The time zone the server writes every timestamp in. No organisation chooses one yet, so it is UTC,
 * and the zone is always written after the time so nobody reads it as local time; office pages are
 * then rewritten in the reader's zone by the browser (client/office.ts).
 */
export const TIME_ZONE = 'UTC';

/**
 * A stored instant (ISO 8601, e.g. "2026-12-02T14:05:09.123Z") as the reader reads it: "Dec 2, 2026,
 * 14:05 UTC" (en) or "2 dic 2026, 14:05 UTC" (es). Another IANA zone may be given; its abbreviation
 * or offset is then written instead of UTC. Text that is not an instant is returned as it is.
 */
export function dateTime(iso: string | null | undefined, lang: Lang = 'en', timeZone: string = TIME_ZONE): string {
  if (!iso) return '—';
  // A timestamp stored without a zone (SQLite's CURRENT_TIMESTAMP) is UTC, whatever this machine's zone.
  const zoneless = /^\d{4}-\d\d-\d\d[ T]\d\d:\d\d(:\d\d(\.\d+)?)?$/.test(iso);
  const at = new Date(zoneless ? `${iso.replace(' ', 'T')}Z` : iso);
  if (Number.isNaN(at.getTime())) return iso;
  const parts = Object.fromEntries(
    new Intl.DateTimeFormat('en-US', { timeZone, hourCycle: 'h23', year: 'numeric', month: '2-digit', day: '2-digit', hour: '2-digit', minute: '2-digit', timeZoneName: 'short' })
      .formatToParts(at)
      .map((p) => [p.type, p.value]),
  );
  const zone = timeZone === 'UTC' ? 'UTC' : parts.timeZoneName;
  return `${date(`${parts.year}-${parts.month}-${parts.day}`, lang)}, ${parts.hour}:${parts.minute} ${zone}`;
}

export type Nearness = 'just_below' | 'just_above' | null;

export interface ComparedFigures {
  value: Figure;
  threshold: Figure;
  /** The unrounded comparison, the only one a verdict may use. */
  atOrAbove: boolean;
  /**
   * Set when the usual rounding would make the two look equal or in the wrong order: the figures
   * then carry more decimals (up to 2), and when even that is not enough the caller says "just
   * below" / "just above" beside them.
   */
  nearness: Nearness;
  /** True when even 2 decimals could not separate them: show the words, not only the numbers. */
  wordsNeeded: boolean;
}

/**
 * A biomass and its threshold, formatted so the shown numbers never contradict the unrounded
 * comparison: 4,495.8 against 4,500 shows "4,496" and "4,500"; 4,499.7 against 4,500 shows
 * "4,499.7" and "4,500.0" (nearness 'just_below').
 */
export function biomassAgainstThreshold(valueKgHa: number, thresholdKgHa: number, units: UnitSystem, lang: Lang = 'en'): ComparedFigures {
  const atOrAbove = valueKgHa >= thresholdKgHa;
  for (let d: number = DECIMALS.biomass; d <= 2; d++) {
    const v = biomass(valueKgHa, units, lang, d);
    const t = biomass(thresholdKgHa, units, lang, d);
    const consistent = atOrAbove ? v.rounded >= t.rounded : v.rounded < t.rounded;
    if (consistent) {
      const nearness: Nearness = d === DECIMALS.biomass ? null : atOrAbove ? 'just_above' : 'just_below';
      return { value: v, threshold: t, atOrAbove, nearness, wordsNeeded: false };
    }
  }
  return {
    value: biomass(valueKgHa, units, lang, 2),
    threshold: biomass(thresholdKgHa, units, lang, 2),
    atOrAbove,
    nearness: atOrAbove ? 'just_above' : 'just_below',
    wordsNeeded: true,
  };
}
