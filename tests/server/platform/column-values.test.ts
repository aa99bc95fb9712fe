import { describe, expect, it } from 'vitest';
import { flag, isoDay, isoTime, jsonValue } from '../../../server/platform/column-values';

// What each engine hands back for the same stored value (server/platform/database.ts turns
// PostgreSQL's dates into text; a Date still reads the same if one comes through).
describe('column values read one way on both engines', () => {
  it('json: parsed text (SQLite) and an object (PostgreSQL) are the same; nothing stored is null', () => {
    expect(jsonValue('{"a":[1,2]}')).toEqual({ a: [1, 2] });
    expect(jsonValue({ a: [1, 2] })).toEqual({ a: [1, 2] });
    expect([jsonValue(null), jsonValue(undefined), jsonValue('')]).toEqual([null, null, null]);
  });

  it('timestamps and dates as ISO text', () => {
    // 2027-03-15 10:20 UTC, worked by hand: 1970-01-01 to 2027-01-01 is 57 × 365 + 14 leap days
    // (1972 … 2024) = 20,819 days, then 31 + 28 + 14 = 73 days of 2027: 20,892 days × 86,400,000 ms,
    // plus 10 h 20 min = 37,200,000 ms, is 1,805,106,000,000 ms after the epoch.
    const at = new Date(1_805_106_000_000);
    expect(isoTime(at)).toBe('2027-03-15T10:20:00.000Z');
    expect(isoTime('2027-03-15T10:20:00.000Z')).toBe('2027-03-15T10:20:00.000Z');
    expect(isoDay(at)).toBe('2027-03-15');
    expect(isoDay('2027-03-15')).toBe('2027-03-15');
    expect(isoDay('2027-03-15T10:20:00.000Z')).toBe('2027-03-15');
    expect([isoTime(null), isoTime(''), isoDay(undefined), isoDay('')]).toEqual([null, null, null, null]);
  });

  it('booleans: true/false (PostgreSQL) and 1/0 as a number or text (SQLite)', () => {
    expect([flag(true), flag(1), flag('1')]).toEqual([true, true, true]);
    expect([flag(false), flag(0), flag('0'), flag(null)]).toEqual([false, false, false, false]);
  });
});
