import { CalcError } from './errors';

/*
 * Calendar-day arithmetic on ISO 'YYYY-MM-DD' strings, as whole UTC calendar days.
 * Each date becomes an integer day number (days since 1970-01-01) by the civil-calendar formula
 * (H. Hinnant, "chrono-compatible low-level date algorithms"), so no Date object, time zone or
 * daylight-saving shift is involved anywhere. date-fns is not used here on purpose: its functions
 * read and write Dates in the device's local time zone, which is exactly what a rule about calendar
 * days must not depend on (a phone in another zone would count a different day).
 */

export function isLeapYear(y: number): boolean {
  return (y % 4 === 0 && y % 100 !== 0) || y % 400 === 0;
}

const MONTH_DAYS = [31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31];

export function daysInMonth(y: number, m: number): number {
  const days = MONTH_DAYS[m - 1];
  if (days === undefined) throw new RangeError(`There is no month ${m}.`);
  return m === 2 && isLeapYear(y) ? 29 : days;
}

/** Day number of a proleptic Gregorian date (1970-01-01 → 0). */
export function dayNumber(y: number, m: number, d: number): number {
  const yy = m <= 2 ? y - 1 : y;
  const era = Math.floor(yy / 400);
  const yoe = yy - era * 400;
  const mp = (m + 9) % 12; // March = 0
  const doy = Math.floor((153 * mp + 2) / 5) + d - 1;
  const doe = yoe * 365 + Math.floor(yoe / 4) - Math.floor(yoe / 100) + doy;
  return era * 146097 + doe - 719468;
}

export interface IsoDay {
  y: number;
  m: number;
  d: number;
  day: number;
}

export function parseIsoDate(s: unknown, field: string): IsoDay {
  const match = typeof s === 'string' ? /^(\d{4})-(\d{2})-(\d{2})$/.exec(s) : null;
  if (!match) throw new CalcError('bad_date', `${field} must be a date written YYYY-MM-DD.`, field);
  const y = Number(match[1]), m = Number(match[2]), d = Number(match[3]);
  if (y < 1000 || m < 1 || m > 12 || d < 1 || d > daysInMonth(y, m)) {
    throw new CalcError('bad_date', `${field} (${s}) is not a real calendar date.`, field);
  }
  return { y, m, d, day: dayNumber(y, m, d) };
}

/** Number of calendar days from a to b (b − a). */
export function daysBetween(a: string, b: string): number {
  return parseIsoDate(b, 'to').day - parseIsoDate(a, 'from').day;
}

export interface SeasonWindow {
  /** 'MM-DD', first day inside the window. */
  start: string;
  /** 'MM-DD', last day inside the window (inclusive). */
  end: string;
}

interface MonthDay {
  m: number;
  d: number;
}

function parseMonthDay(s: unknown, field: string): MonthDay {
  const match = typeof s === 'string' ? /^(\d{2})-(\d{2})$/.exec(s) : null;
  if (!match) throw new CalcError('bad_window', `${field} must be a month and day written MM-DD, e.g. 10-01.`, field);
  const m = Number(match[1]), d = Number(match[2]);
  if (m < 1 || m > 12 || d < 1 || d > (m === 2 ? 29 : MONTH_DAYS[m - 1]!)) {
    throw new CalcError('bad_window', `${field} (${s}) is not a real month and day.`, field);
  }
  return { m, d };
}

export function parseWindow(window: unknown): { start: MonthDay; end: MonthDay; crossesYear: boolean } {
  if (typeof window !== 'object' || window === null) {
    throw new CalcError('bad_window', 'The rainy window needs a start and an end, each MM-DD.', 'window');
  }
  const w = window as Partial<SeasonWindow>;
  const start = parseMonthDay(w.start, 'window.start');
  const end = parseMonthDay(w.end, 'window.end');
  const crossesYear = start.m * 100 + start.d > end.m * 100 + end.d;
  return { start, end, crossesYear };
}

/*
 * Counting convention: a day of growth is a calendar day D with seededOn ≤ D < endOn; the seeding
 * day counts, the end day (termination, or "today" for a projection) does not, so a crop seeded
 * 10-01 and terminated 10-31 grew 30 days, the plain difference of the two dates. A window day is any
 * day whose month-day lies within [start, end], both inclusive; windows with start after end run over
 * the new year (10-01..03-31 means Oct 1 to Mar 31 of the next year). 02-29 is an ordinary window day
 * in leap years. As a window boundary in a common year, start 02-29 means Mar 1 and end 02-29 means
 * Feb 28 (the window holds the days it would hold in a leap year, less Feb 29). A planting that spans
 * several windows (several rainy seasons) counts the days in each.
 */
export function daysInWindow(seededOn: string, endOn: string, window: SeasonWindow): number {
  const a = parseIsoDate(seededOn, 'seededOn');
  const b = parseIsoDate(endOn, 'endOn');
  const w = parseWindow(window);
  if (b.day < a.day) {
    throw new CalcError('dates_out_of_order', `The end date (${endOn}) is before the seeding date (${seededOn}).`, 'endOn');
  }
  const startOf = (y: number) =>
    w.start.m === 2 && w.start.d === 29 && !isLeapYear(y) ? dayNumber(y, 3, 1) : dayNumber(y, w.start.m, w.start.d);
  const endOf = (y: number) =>
    w.end.m === 2 && w.end.d === 29 && !isLeapYear(y) ? dayNumber(y, 2, 28) : dayNumber(y, w.end.m, w.end.d);
  let total = 0;
  // The window that opens in year Y closes in Y (or Y + 1 when it crosses the new year); those
  // occurrences never overlap, so their overlaps with [seededOn, endOn) simply add up.
  for (let y = a.y - 1; y <= b.y; y++) {
    const ws = startOf(y);
    const weExclusive = endOf(w.crossesYear ? y + 1 : y) + 1;
    const overlap = Math.min(b.day, weExclusive) - Math.max(a.day, ws);
    if (overlap > 0) total += overlap;
  }
  return total;
}
