import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { CsvReadError, decodeUtf8, detectDelimiter, readCsv, readCsvText } from '../../../server/platform/csv-read';
import { biomassUnitHint, checkCalibrationCsv, lengthUnitHint, mapColumns, normaliseHeader, parseNumber, toKgHa } from '../../../server/calibrations/import';
import { inToCm, lbPerAcToKgPerHa } from '../../../shared/calc';
import { at } from '../../helpers/lists';

const fixture = (name: string) => readFileSync(`tests/fixtures/calibration/${name}`, 'utf8');

describe('csv-read (generic CSV reading)', () => {
  it('reads UTF-8 with and without a byte order mark, the same, and says which', () => {
    const text = 'length_cm,biomass_kg_ha\n50,2000\n';
    const plain = readCsv(Buffer.from(text, 'utf8'));
    const bom = readCsv(Buffer.concat([Buffer.from([0xef, 0xbb, 0xbf]), Buffer.from(text, 'utf8')]));
    expect({ ...bom, bom: false }).toEqual(plain);
    expect([plain.bom, bom.bom]).toEqual([false, true]);
    expect(plain.header).toEqual(['length_cm', 'biomass_kg_ha']);
    expect(plain.rows).toEqual([['50', '2000']]);
    expect(plain.lines).toEqual([2]);
    expect(plain.startLines).toEqual([2]);
  });

  it('refuses UTF-16, other character sets and binary files with a clear message', () => {
    const utf16 = Buffer.concat([Buffer.from([0xff, 0xfe]), Buffer.from('a,b\n', 'utf16le')]);
    expect(() => decodeUtf8(utf16)).toThrowError(/UTF-16/);
    const latin1 = Buffer.from([0x73, 0x69, 0x74, 0x65, 0x0a, 0x43, 0x61, 0x6d, 0x70, 0x6f, 0x20, 0xe9]); // "Campo é" in Windows-1252
    expect(() => decodeUtf8(latin1)).toThrowError(/not UTF-8/);
    expect(() => decodeUtf8(Buffer.from([0x50, 0x4b, 0x03, 0x04, 0x00, 0x00]))).toThrowError(/binary/);
    try {
      decodeUtf8(latin1);
    } catch (e) {
      expect(e).toBeInstanceOf(CsvReadError);
      expect((e as CsvReadError).code).toBe('not_utf8');
    }
  });

  it('detects comma or semicolon from the header line, ignoring quoted separators', () => {
    expect(detectDelimiter('a,b,c\n1;2;3')).toBe(',');
    expect(detectDelimiter('a;b;c\n1,5;2;3')).toBe(';');
    expect(detectDelimiter('"x,y";b;c\n')).toBe(';');
    expect(detectDelimiter('single\n1')).toBe(',');
  });

  it('skips blank lines, trims cells, reports line numbers and broken quotes', () => {
    const t = readCsvText('a, b\n\n 1 , 2 \n"multi\nline",3\n');
    expect(t.header).toEqual(['a', 'b']);
    expect(t.rows).toEqual([['1', '2'], ['multi\nline', '3']]);
    expect(t.lines).toEqual([3, 5]);
    // Line 1 header, 2 blank, 3 the first row, 4–5 the quoted cell across two lines.
    expect(t.startLines).toEqual([3, 4]);
    expect(() => readCsvText('a,b\n"1,2\n3,4\n')).toThrowError(/quoted cell is not closed/);
  });

  it('stops at the row limit and refuses an empty file', () => {
    expect(readCsvText('a\n1\n2\n', { maxRows: 2 }).rows).toHaveLength(2);
    expect(() => readCsvText('a\n1\n2\n3\n', { maxRows: 2 })).toThrowError(/more than 2 rows/);
    expect(() => readCsvText('  \n\n')).toThrowError(/empty/);
  });
});

describe('calibration columns and units', () => {
  it('normalises header names and finds the columns', () => {
    expect(normaliseHeader('Mean length (in)')).toBe('mean_length_in');
    expect(normaliseHeader('Biomass g/m²')).toBe('biomass_g_m2');
    const m = mapColumns(['Site', 'length_in', 'Biomass (lb/ac)', 'Date', 'Zadoks', 'Notes', 'extra']);
    expect(m.ok).toBe(true);
    if (!m.ok) return;
    expect(m.map).toEqual({ site: 0, length: 1, biomass: 2, date: 3, stage: 4, note: 5 });
    expect(m.hints).toEqual({ lengthUnit: 'in', biomassUnit: 'lb_ac' });
    expect(at(m.columns, 6).role).toBeNull();
  });

  it.each([
    ['length_cm', 'cm'],
    ['Length (in)', 'in'],
    ['length inches', 'in'],
    ['mean_length', null],
  ])('length hint of %s is %s', (h, unit) => expect(lengthUnitHint(normaliseHeader(h))).toBe(unit));

  it.each([
    ['biomass_kg_ha', 'kg_ha'],
    ['Biomass (kg/ha)', 'kg_ha'],
    ['biomass_lb_ac', 'lb_ac'],
    ['Biomass lbs/acre', 'lb_ac'],
    ['biomass_g_m2', 'g_m2'],
    ['Biomass (g/m²)', 'g_m2'],
    ['dry biomass', null],
  ])('biomass hint of %s is %s', (h, unit) => expect(biomassUnitHint(normaliseHeader(h))).toBe(unit));

  it('says what is missing when the header has no length or biomass column', () => {
    const m = mapColumns(['x', 'y']);
    expect(m.ok).toBe(false);
    if (!m.ok) expect(m.message).toMatch(/length column.*biomass column/);
    const two = mapColumns(['length_cm', 'length_in', 'biomass_kg_ha']);
    expect(two.ok).toBe(false);
  });

  it('reads numbers as spreadsheets write them', () => {
    expect(parseNumber('61.5', ',')).toBe(61.5);
    expect(parseNumber('61,5', ';')).toBe(61.5);
    expect(parseNumber('4,500', ',')).toBe(4500);
    expect(parseNumber(' 1e3 ', ',')).toBe(1000);
    expect(parseNumber('61,5', ',')).toBeNull(); // ambiguous in a comma file
    expect(parseNumber('abc', ',')).toBeNull();
    expect(parseNumber('', ',')).toBeNull();
  });

  it('converts exactly: 1 g/m² = 10 kg/ha, lb/ac and inches by the exact factors', () => {
    expect(toKgHa(1, 'g_m2')).toBe(10);
    expect(toKgHa(123.4, 'g_m2')).toBeCloseTo(1234, 10);
    expect(toKgHa(4500, 'lb_ac')).toBe(lbPerAcToKgPerHa(4500));
    expect(toKgHa(4500, 'lb_ac')).toBeCloseTo(5043.83, 2); // 4,500 lb/ac ≈ 5,044 kg/ha (product brief)
    expect(toKgHa(2000, 'kg_ha')).toBe(2000);
  });
});

describe('checkCalibrationCsv', () => {
  it('converts an inch and lb/ac file to cm and kg/ha', () => {
    const check = checkCalibrationCsv(fixture('rye-inches-lbac.csv'));
    expect(check.fileError).toBeNull();
    expect(check.ok).toBe(true);
    expect(check.lengthUnit).toBe('in');
    expect(check.biomassUnit).toBe('lb_ac');
    expect(check.rowCount).toBe(150);
    expect(check.points).toHaveLength(150);
    const first = at(check.points, 0);
    expect(first.x).toBeCloseTo(inToCm(24.02), 12);
    expect(first.y).toBeCloseTo(lbPerAcToKgPerHa(3168), 9);
    expect(first).toMatchObject({ site: 'Trial plot 2', date: '2026-01-10', stage: 'Zadoks 30', note: 'invented test data', line: 2 });
  });

  it('reads a semicolon file with decimal commas in g/m² (×10 to kg/ha)', () => {
    const check = checkCalibrationCsv(fixture('g-m2-semicolon.csv'));
    expect(check.ok).toBe(true);
    expect(check.delimiter).toBe(';');
    expect(check.biomassUnit).toBe('g_m2');
    expect(check.points.map((p) => [p.x, p.y])).toEqual([
      [30.5, 1200],
      [45, 2105],
      [60, 3300],
      [75, 4700],
      [90, 6100],
    ]);
  });

  it('a unit chosen on the form overrides the header hint', () => {
    const check = checkCalibrationCsv(fixture('g-m2-semicolon.csv'), { lengthUnit: 'in', biomassUnit: 'kg_ha' });
    expect(check.points[1]).toMatchObject({ x: inToCm(45), y: 210.5 });
  });

  it('lists every bad row with its line and saves nothing', () => {
    const check = checkCalibrationCsv(fixture('bad-rows.csv'));
    expect(check.ok).toBe(false);
    expect(check.errors.map((e) => e.line)).toEqual([3, 4, 5, 6, 7]);
    expect(check.errors.map((e) => e.message)).toEqual([
      expect.stringMatching(/“abc” is not a number/),
      expect.stringMatching(/biomass_kg_ha is empty/),
      expect.stringMatching(/greater than 0/),
      expect.stringMatching(/2026-02-30.*YYYY-MM-DD/),
      expect.stringMatching(/99000 kg\/ha is more than 40,000 kg\/ha/),
    ]);
    expect(check.points).toHaveLength(2);
  });

  it('asks for the units when the header does not say', () => {
    const check = checkCalibrationCsv('length,biomass\n40,1500\n50,2000\n60,2500\n70,3200\n');
    expect(check.ok).toBe(false);
    expect(check.errors).toEqual([]);
    expect(Object.keys(check.unitErrors).sort()).toEqual(['biomassUnit', 'lengthUnit']);
    expect(checkCalibrationCsv('length,biomass\n40,1500\n50,2000\n60,2500\n70,3200\n', { lengthUnit: 'cm', biomassUnit: 'kg_ha' }).ok).toBe(true);
  });

  it('catches a unit mistake by its size, in the file’s unit', () => {
    const check = checkCalibrationCsv('length_in,biomass_g_m2\n40,150\n50,200\n130,250\n60,5000\n');
    expect(check.errors.map((e) => e.line)).toEqual([4, 5]);
    expect(check.errors.map((e) => e.message)).toEqual([
      expect.stringMatching(/130 in is longer than 118.1 in/),
      expect.stringMatching(/5000 g\/m² is more than 4,000 g\/m²/),
    ]);
  });

  it('needs enough points and distinct lengths, and flags rows that split on a decimal comma', () => {
    expect(checkCalibrationCsv('length_cm,biomass_kg_ha\n40,1500\n50,2000\n').setErrors[0]).toMatch(/at least 4/);
    expect(checkCalibrationCsv('length_cm,biomass_kg_ha\n40,1500\n40,2000\n50,2100\n50,2500\n').setErrors[0]).toMatch(/three different lengths/);
    const split = checkCalibrationCsv('length_cm,biomass_kg_ha\n40,5,1500\n50,2000\n60,2500\n70,3000\n');
    expect(at(split.errors, 0)).toMatchObject({ line: 2, message: expect.stringMatching(/3 cells/) });
  });

  it('reports a file-level problem instead of row errors', () => {
    expect(checkCalibrationCsv('').fileError).toMatch(/empty/);
    expect(checkCalibrationCsv('site,date\nA,2026-01-01\n').fileError).toMatch(/needs a length column/);
  });
});
