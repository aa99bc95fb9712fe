import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { daysInWindow } from '../../shared/calc';
import { at } from '../helpers/lists';
import { codeOf } from './prng';

const RAINY = { start: '10-01', end: '03-31' }; // the demo window (invented), crosses the new year

describe('daysInWindow (seeding day counted, end day not; window days inclusive)', () => {
  it.each([
    // [seededOn, endOn, window, expected, why — counted by hand]
    ['2023-10-01', '2023-12-30', RAINY, 90, 'Oct 31 + Nov 30 + Dec 1–29 (29)'],
    ['2023-09-15', '2024-04-15', RAINY, 183, 'whole window Oct 1 2023–Mar 31 2024, leap year (Feb 29)'],
    ['2022-09-15', '2023-04-15', RAINY, 182, 'whole window, common year'],
    ['2023-11-15', '2024-01-10', RAINY, 56, 'Nov 15–30 (16) + Dec (31) + Jan 1–9 (9)'],
    ['2024-02-20', '2024-03-05', RAINY, 14, 'Feb 20–29 (10) + Mar 1–4 (4): leap day inside'],
    ['2023-02-20', '2023-03-05', RAINY, 13, 'Feb 20–28 (9) + Mar 1–4 (4)'],
    ['2022-10-01', '2024-04-01', RAINY, 365, 'two windows, each counted: 182 + 183'],
    ['2024-04-01', '2024-09-30', RAINY, 0, 'entirely outside the window'],
    ['2024-01-10', '2024-01-10', RAINY, 0, 'same day: no growth yet'],
    ['2024-03-01', '2024-05-01', { start: '04-01', end: '06-30' }, 30, 'window inside one year: April'],
    ['2022-11-01', '2023-04-01', { start: '12-01', end: '02-29' }, 90, 'end 02-29 in a common year means Feb 28: 31+31+28'],
    ['2023-11-01', '2024-04-01', { start: '12-01', end: '02-29' }, 91, 'same window in a leap year: 31+31+29'],
    ['2023-02-01', '2023-04-01', { start: '02-29', end: '03-10' }, 10, 'start 02-29 in a common year means Mar 1: Mar 1–10'],
    ['2024-02-01', '2024-04-01', { start: '02-29', end: '03-10' }, 11, 'leap year: Feb 29 + Mar 1–10'],
    ['2024-01-01', '2025-01-01', { start: '07-04', end: '07-04' }, 1, 'one-day window'],
  ])('%s → %s in %j: %d (%s)', (a, b, w, expected) => {
    expect(daysInWindow(a, b, w)).toBe(expected);
  });

  it.each([
    ['end before seeding', '2024-03-01', '2024-02-01', RAINY, 'dates_out_of_order'],
    ['not a date', '2024/03/01', '2024-04-01', RAINY, 'bad_date'],
    ['Feb 30', '2023-02-30', '2023-04-01', RAINY, 'bad_date'],
    ['Feb 29 in a common year', '2023-02-29', '2023-04-01', RAINY, 'bad_date'],
    ['empty end', '2023-02-01', '', RAINY, 'bad_date'],
    ['month 13 in window', '2023-01-01', '2023-04-01', { start: '13-01', end: '03-31' }, 'bad_window'],
    ['02-30 in window', '2023-01-01', '2023-04-01', { start: '10-01', end: '02-30' }, 'bad_window'],
    ['window written M-D', '2023-01-01', '2023-04-01', { start: '10-1', end: '03-31' }, 'bad_window'],
    ['no window', '2023-01-01', '2023-04-01', null, 'bad_window'],
  ])('%s → %s', (_n, a, b, w, code) => {
    expect(codeOf(() => daysInWindow(a, b, w as never))).toBe(code);
  });

  it('equals a brute-force day-by-day count for random dates and windows (property)', () => {
    const iso = (t: number) => new Date(t).toISOString().slice(0, 10);
    const md = fc
      .tuple(fc.integer({ min: 1, max: 12 }), fc.integer({ min: 1, max: 31 }))
      .filter(([m, d]) => d <= at([31, 29, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31], m - 1, 'month'))
      .map(([m, d]) => `${String(m).padStart(2, '0')}-${String(d).padStart(2, '0')}`);
    const DAY = 86_400_000;
    fc.assert(
      fc.property(
        fc.integer({ min: Date.UTC(1999, 0, 1) / DAY, max: Date.UTC(2031, 0, 1) / DAY }),
        fc.integer({ min: 0, max: 1200 }),
        md,
        md,
        (startDay, length, start, end) => {
          // Brute force with the platform's own UTC calendar: walk the days, compare MM-DD strings.
          let count = 0;
          for (let k = 0; k < length; k++) {
            const mmdd = iso((startDay + k) * DAY).slice(5);
            const inside = start <= end ? mmdd >= start && mmdd <= end : mmdd >= start || mmdd <= end;
            if (inside) count++;
          }
          return daysInWindow(iso(startDay * DAY), iso((startDay + length) * DAY), { start, end }) === count;
        },
      ),
      { numRuns: 1500 },
    );
  });
});
