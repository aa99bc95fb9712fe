import { date, formatNumber } from '../../shared/format/figures';
import { LOCALES, type Language } from './i18n';

/**
 * Numbers, lengths, masses, distances and dates for the chosen language and units. Numbers are
 * written by the one shared formatter (shared/format/figures.ts: "4,495.8" in English and Spanish
 * alike, as Intl writes en-US and es-MX) and calendar dates too ("Dec 2, 2026", "2 dic 2026");
 * only a moment with its hour goes through Intl, in the phone's own time zone.
 * Values arrive in SI (cm, kg/ha, m, ha) and are shown in the user's units.
 * Conversion factors are the exact ones of shared/calc/units.ts, repeated here so the first screen
 * does not load the estimation core.
 */

export type Units = 'us' | 'metric';

const CM_PER_IN = 2.54;
const M_PER_FT = 0.3048;
const HA_PER_ACRE = 0.40468564224;
const KG_PER_LB = 0.45359237;

export interface UnitLabels {
  in: string;
  cm: string;
  ft: string;
  m: string;
  lbac: string;
  kgha: string;
  ac: string;
  ha: string;
}

export type Formatter = ReturnType<typeof makeFormatter>;

export function makeFormatter(language: Language, units: Units, labels: UnitLabels) {
  const locale = LOCALES[language];
  const us = units === 'us';
  const num = (v: number, digits = 0) => formatNumber(v, digits, language);
  return {
    locale,
    units,
    us,
    num,
    lengthUnit: us ? ('in' as const) : ('cm' as const),
    lengthLabel: us ? labels.in : labels.cm,
    massLabel: us ? labels.lbac : labels.kgha,
    /** A shoot length, from cm. */
    length: (cm: number, digits = 1) => `${num(us ? cm / CM_PER_IN : cm, digits)} ${us ? labels.in : labels.cm}`,
    /** Just the number of a length in the user's unit. */
    lengthValue: (cm: number, digits = 1) => num(us ? cm / CM_PER_IN : cm, digits),
    /** Biomass, from kg/ha; rounded to tens (more digits would be false precision). */
    mass: (kgHa: number) => `${num(Math.round((us ? (kgHa * HA_PER_ACRE) / KG_PER_LB : kgHa) / 10) * 10)} ${us ? labels.lbac : labels.kgha}`,
    massValue: (kgHa: number) => num(Math.round((us ? (kgHa * HA_PER_ACRE) / KG_PER_LB : kgHa) / 10) * 10),
    /** A walking distance, from metres. */
    distance: (m: number) => `${num(us ? m / M_PER_FT : m)} ${us ? labels.ft : labels.m}`,
    area: (ha: number) => `${num(us ? ha / HA_PER_ACRE : ha, 1)} ${us ? labels.ac : labels.ha}`,
    /** 'YYYY-MM-DD' as a short local date (no time zone shift: it is a calendar date). */
    date: (iso: string) => {
      try {
        return date(iso.slice(0, 10), language);
      } catch {
        return iso; // not a real calendar date: shown as it came
      }
    },
    dateTime: (ms: number) =>
      new Intl.DateTimeFormat(locale, { day: 'numeric', month: 'short', hour: 'numeric', minute: '2-digit' }).format(new Date(ms)),
    bytes: (n: number) => (n >= 1e6 ? `${num(n / 1e6, 1)} MB` : `${num(Math.max(1, Math.round(n / 1e3)))} KB`),
  };
}

/** Today's calendar date on this phone, as the walk's `walkedOn`. */
export function localIsoDate(d = new Date()): string {
  const p = (n: number) => String(n).padStart(2, '0');
  return `${d.getFullYear()}-${p(d.getMonth() + 1)}-${p(d.getDate())}`;
}
