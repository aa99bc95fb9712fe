import { describe, expect, it } from 'vitest';
import { makeFormatter } from '../../../server/platform/format';

// Office pages write figures with the one shared formatter (shared/format/figures.ts), whatever
// language the browser asks for: the page is English, and the PDF, CSV and phone write "4,495.8".
// Conversions by hand with the exact factors (1 lb = 0.45359237 kg, 1 ac = 0.40468564224 ha):
//   10 ha = 10 / 0.40468564224 ac = 24.7105… ac → "24.7 ac";
//   5,043.83 kg/ha × 0.40468564224 / 0.45359237 = 4,500.0 lb/ac → "4,500 lb/ac".
describe('office figures', () => {
  it.each(['en-US', 'en-GB', 'es-ES', 'es', false] as const)('are written alike for a browser asking for %s', (locale) => {
    const us = makeFormatter('us', locale);
    expect(us.number(12345.678, 1)).toBe('12,345.7');
    expect(us.number(1234)).toBe('1,234');
    expect(us.area(10)).toBe('24.7 ac');
    expect(us.rate(5043.83)).toBe('4,500 lb/ac');
    const metric = makeFormatter('metric', locale);
    expect(metric.area(1234.5, 2)).toBe('1,234.50 ha');
    expect(metric.rate(5043.83)).toBe('5,044 kg/ha');
    expect(metric.area(null)).toBe('—');
  });

  // Calendar days through the shared formatter, checked against Intl (an independent writer):
  // en-US for English and es-MX, the app's Spanish, for a browser preferring Spanish.
  const DAYS = ['2026-12-02', '2027-01-15', '2026-09-05'];
  const intl = (locale: string, day: string) => new Intl.DateTimeFormat(locale, { day: 'numeric', month: 'short', year: 'numeric', timeZone: 'UTC' }).format(new Date(`${day}T00:00:00Z`));
  it.each([
    ['en-US', 'en-US'],
    [false, 'en-US'],
    ['es-ES', 'es-MX'],
    ['es', 'es-MX'],
  ] as const)('write a calendar day for a browser asking for %s as Intl %s does', (locale, like) => {
    const f = makeFormatter('us', locale);
    for (const day of DAYS) expect(f.date(day)).toBe(intl(like, day));
    // A stored timestamp shows its UTC calendar day.
    expect(f.date('2026-12-02T23:30:00.000Z')).toBe(intl(like, '2026-12-02'));
    expect(f.date(null)).toBe('—');
  });
});
