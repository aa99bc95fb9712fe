import { describe, expect, it } from 'vitest';
import {
  checkLength,
  isAccepted,
  isFarFromOthers,
  median,
  parseLength,
  QUESTION_ABOVE_CM,
} from '../../client/features/entry/validation';
import { MAX_LENGTH_CM } from '../../shared/schemas/walks';
import { outlierIndexes } from '../../shared/calc/outliers';

describe('parseLength', () => {
  it.each([
    ['', null],
    ['   ', null],
    ['31', 31],
    ['31.5', 31.5],
    ['31,5', 31.5], // decimal comma, as typed on Spanish keyboards
    [' 31.5 ', 31.5],
    ['.5', 0.5],
    ['0', 0],
    ['-4', -4],
    ['+12', 12],
    ['12.', 12],
  ])('%j → %s', (text, expected) => {
    expect(parseLength(text)).toBe(expected);
  });

  it.each(['abc', '3 1', '1e3', '12..5', '1,000.5', '12in', 'NaN', 'Infinity', '--3'])('%j is not a number', (text) => {
    expect(parseLength(text)).toBeNaN();
  });
});

describe('checkLength: refuse', () => {
  it.each([
    ['abc', 'cm', 'not_number'],
    ['12..5', 'in', 'not_number'],
    ['0', 'cm', 'not_positive'],
    ['0.0', 'in', 'not_positive'],
    ['-3', 'cm', 'not_positive'],
    ['301', 'cm', 'too_long'],
    ['118.2', 'in', 'too_long'], // 300.2 cm
    ['1000', 'in', 'too_long'],
  ] as const)('%j %s → refused (%s)', (text, unit, reason) => {
    const r = checkLength(text, unit, []);
    expect(r.kind).toBe('refused');
    if (r.kind === 'refused') expect(r.reason).toBe(reason);
  });

  it('tells the limit in the unit typed', () => {
    const cm = checkLength('400', 'cm', []);
    const inch = checkLength('400', 'in', []);
    expect(cm.kind === 'refused' && cm.maxInUnit).toBe(MAX_LENGTH_CM);
    expect(inch.kind === 'refused' && inch.maxInUnit).toBe(118.1);
  });

  it('is empty for empty text', () => {
    expect(checkLength('  ', 'cm', [70, 71])).toEqual({ kind: 'empty' });
  });
});

describe('checkLength: question, do not refuse', () => {
  it.each([
    ['251', 'cm'],
    ['300', 'cm'],
    ['99', 'in'], // 251.46 cm
  ] as const)('%j %s is very long: asked', (text, unit) => {
    const r = checkLength(text, unit, []);
    expect(r.kind).toBe('question');
    if (r.kind === 'question') expect(r.reasons).toEqual(['very_long']);
  });

  it(`${QUESTION_ABOVE_CM} cm exactly is accepted`, () => {
    expect(checkLength(String(QUESTION_ABOVE_CM), 'cm', []).kind).toBe('ok');
  });

  // The shared rule (shared/calc/outliers.ts): modified z = |x − median|/(1.4826·MAD) among all six
  // plants, above 3.5 (Iglewicz and Hoaglin, 1993). Worked by hand:
  //   x = 60: sorted 60 70 72 74 75 78, median 73; deviations 13 3 1 1 2 5 → MAD 2.5, scale 3.7065;
  //           z = 13/3.7065 = 3.507 > 3.5 → question;  x = 61: 12/3.7065 = 3.24 → ok; x = 63: ok.
  //   x = 90: sorted 70 72 74 75 78 90, median 74.5; deviations 2.5 0.5 4.5 3.5 0.5 15.5 → MAD 3,
  //           scale 4.4478; z = 15.5/4.4478 = 3.48 → ok;  x = 91: 16.5/4.4478 = 3.71 → question.
  //   x = 8: median 73, MAD 2.5; z = 65/3.7065 = 17.5 → question.
  const others = [72, 75, 70, 78, 74];
  it.each([
    ['8', 'question'],
    ['60', 'question'],
    ['61', 'ok'],
    ['63', 'ok'],
    ['90', 'ok'],
    ['91', 'question'],
  ] as const)('%j cm among the five others → %s', (text, kind) => {
    const r = checkLength(text, 'cm', others);
    expect(r.kind).toBe(kind);
    if (r.kind === 'question') {
      expect(r.reasons).toEqual(['far_from_others']);
      expect(r.medianCm).toBe(74); // the median of the others, shown to the sampler
    }
  });

  it('the outlier check starts at four plants in all (three others), as in review', () => {
    // [72, 75] + 8: three plants, no test. [72, 75, 70] + 8: sorted 8 70 72 75, median 71,
    // deviations 63 1 1 4 → MAD 2.5; z = 63/3.7065 = 17 → question.
    expect(checkLength('8', 'cm', [72, 75]).kind).toBe('ok');
    expect(checkLength('8', 'cm', [72, 75, 70]).kind).toBe('question');
  });

  it('is the very rule the office review uses (same plant, same answer)', () => {
    const lengths = [72, 75, 70, 78, 74, 91];
    expect(outlierIndexes(lengths)).toEqual([5]);
    expect(isFarFromOthers(91, lengths.slice(0, 5))).toBe(true);
    expect(isFarFromOthers(74, [72, 75, 70, 78, 91])).toBe(false);
  });

  it('works in inches against lengths stored in cm', () => {
    const othersCm = [30, 31, 29, 32, 30].map((v) => v * 2.54);
    expect(checkLength('31', 'in', othersCm).kind).toBe('ok');
    expect(checkLength('3', 'in', othersCm).kind).toBe('question');
  });

  it('identical lengths: the mean absolute deviation stands in for a MAD of 0', () => {
    // 75 75 75 75 76: median 75, MAD 0; mean absolute deviation 0.2 → scale 1.253314·0.2 = 0.2507;
    // z(76) = 1/0.2507 = 3.99 > 3.5, so the phone asks, as review would flag it.
    expect(isFarFromOthers(76, [75, 75, 75, 75])).toBe(true);
    expect(isFarFromOthers(75, [75, 75, 75, 75])).toBe(false);
  });

  it('both reasons together', () => {
    const r = checkLength('280', 'cm', [70, 72, 74, 71]);
    expect(r.kind === 'question' && r.reasons).toEqual(['very_long', 'far_from_others']);
  });

  it('a questioned value counts once the sampler confirmed that very text', () => {
    const r = checkLength('260', 'cm', []);
    expect(isAccepted(r, undefined, '260')).toBe(false);
    expect(isAccepted(r, '260', '260')).toBe(true);
    expect(isAccepted(r, '250', '260')).toBe(false);
    expect(isAccepted(checkLength('70', 'cm', []), undefined, '70')).toBe(true);
    expect(isAccepted(checkLength('0', 'cm', []), '0', '0')).toBe(false);
  });
});

describe('median', () => {
  it.each([
    [[3], 3],
    [[1, 9], 5],
    [[5, 1, 3], 3],
    [[4, 1, 3, 2], 2.5],
  ])('%j → %s', (values, expected) => {
    expect(median(values)).toBe(expected);
  });
});
