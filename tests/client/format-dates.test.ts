import { describe, expect, it } from 'vitest';
import { makeFormatter, type UnitLabels } from '../../client/lib/format';

const LABELS: UnitLabels = { in: 'in', cm: 'cm', ft: 'ft', m: 'm', lbac: 'lb/ac', kgha: 'kg/ha', ac: 'ac', ha: 'ha' };
// Intl, an independent writer, in the phone's locales (client/lib/i18n.ts: en-US, es-MX).
const intl = (locale: string, day: string) => new Intl.DateTimeFormat(locale, { day: 'numeric', month: 'short', year: 'numeric', timeZone: 'UTC' }).format(new Date(`${day}T00:00:00Z`));

describe('phone calendar days', () => {
  it.each([
    ['en', 'en-US'],
    ['es', 'es-MX'],
  ] as const)('in %s are written as Intl %s writes them', (language, locale) => {
    const f = makeFormatter(language, 'us', LABELS);
    for (const day of ['2026-12-02', '2027-01-15', '2026-09-05', '2028-02-29']) expect(f.date(day)).toBe(intl(locale, day));
  });

  it('shows a text that is not a real calendar day as it came', () => {
    const f = makeFormatter('en', 'us', LABELS);
    expect(f.date('2026-02-30')).toBe('2026-02-30');
    expect(f.date('soon')).toBe('soon');
  });
});
