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

  const others = [72, 75, 70, 78, 74]; // median 74, MAD 2 → robust SD max(2.97, 3.7, 1) = 3.7
  it.each([
    ['8', 'question'],
    ['60', 'question'], // 14 below the median: > 3 × 3.7 = 11.1
    ['63', 'ok'], // 11 below: within
    ['85', 'ok'],
    ['86', 'question'],
  ] as const)('%j cm among %j others → %s', (text, kind) => {
    const r = checkLength(text, 'cm', others);
    expect(r.kind).toBe(kind);
    if (r.kind === 'question') {
      expect(r.reasons).toEqual(['far_from_others']);
      expect(r.medianCm).toBe(74);
    }
  });

  it('the outlier check waits for four other plants', () => {
    expect(checkLength('8', 'cm', [72, 75, 70]).kind).toBe('ok');
    expect(checkLength('8', 'cm', [72, 75, 70, 71]).kind).toBe('question');
  });

  it('works in inches against lengths stored in cm', () => {
    const othersCm = [30, 31, 29, 32, 30].map((v) => v * 2.54);
    expect(checkLength('31', 'in', othersCm).kind).toBe('ok');
    expect(checkLength('3', 'in', othersCm).kind).toBe('question');
  });

  it('a run of identical lengths does not flag every small difference (MAD = 0)', () => {
    expect(isFarFromOthers(76, [75, 75, 75, 75])).toBe(false);
    expect(isFarFromOthers(90, [75, 75, 75, 75])).toBe(true);
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
