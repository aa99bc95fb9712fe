import fs from 'node:fs';
import path from 'node:path';
import { createRequire } from 'node:module';
import { describe, expect, it } from 'vitest';
import { woffToSfnt } from '../../../server/registers/woff';

// fontkit (the font library pdfkit uses) reads both WOFF and plain TrueType on its own, so it
// checks the unpacking independently of the code under test.
const require = createRequire(import.meta.url);
const fontkit = require('fontkit') as { create(buffer: Buffer): FontkitFont };
interface FontkitFont {
  type: string;
  numGlyphs: number;
  postscriptName: string;
  unitsPerEm: number;
  layout(text: string): { advanceWidth: number; glyphs: { id: number }[] };
}
const LATO = path.join(path.dirname(require.resolve('@fontsource/lato/package.json')), 'files');

/** OpenType table checksum (OpenType spec, "Calculating checksums"): the sum of the table as big-endian uint32s, padded with zeros. */
function tableChecksum(data: Buffer): number {
  const padded = Buffer.concat([data, Buffer.alloc((4 - (data.length % 4)) % 4)]);
  let sum = 0;
  for (let i = 0; i < padded.length; i += 4) sum = (sum + padded.readUInt32BE(i)) >>> 0;
  return sum;
}

describe('woffToSfnt', () => {
  for (const file of ['lato-latin-400-normal.woff', 'lato-latin-700-normal.woff']) {
    it(`unpacks ${file} into a TrueType file that lays out text exactly as the WOFF does`, () => {
      const woff = fs.readFileSync(path.join(LATO, file));
      const sfnt = woffToSfnt(woff);
      const a = fontkit.create(woff);
      const b = fontkit.create(sfnt);
      expect(a.type).toBe('WOFF');
      expect(b.type).toBe('TTF');
      expect(b.numGlyphs).toBe(a.numGlyphs);
      expect(b.postscriptName).toBe(a.postscriptName);
      expect(b.unitsPerEm).toBe(a.unitsPerEm);
      for (const text of ['Crowntip · Block 017', '4,512 lb/ac (3,835–5,189)', 'Eligible — Not eligible', 'Año, señal, niño']) {
        const [la, lb] = [a.layout(text), b.layout(text)];
        expect(lb.advanceWidth).toBe(la.advanceWidth);
        expect(lb.glyphs.map((g) => g.id)).toEqual(la.glyphs.map((g) => g.id));
      }
    });
  }

  it('writes the sfnt header and a table directory whose checksums match every table', () => {
    const sfnt = woffToSfnt(fs.readFileSync(path.join(LATO, 'lato-latin-400-normal.woff')));
    const numTables = sfnt.readUInt16BE(4);
    // OpenType spec, table directory: searchRange = 16 × (largest power of 2 ≤ numTables),
    // entrySelector = log2 of that power, rangeShift = 16 × numTables − searchRange.
    // Worked by hand for the count read from the file: e.g. 15 tables → 8 → 128, 3, 112.
    let power = 1;
    while (power * 2 <= numTables) power *= 2;
    expect(sfnt.readUInt16BE(6)).toBe(16 * power);
    expect(sfnt.readUInt16BE(8)).toBe(Math.round(Math.log(power) / Math.LN2));
    expect(sfnt.readUInt16BE(10)).toBe(16 * numTables - 16 * power);
    for (let i = 0; i < numTables; i++) {
      const at = 12 + 16 * i;
      const tag = sfnt.toString('latin1', at, at + 4);
      const [checksum, offset, length] = [sfnt.readUInt32BE(at + 4), sfnt.readUInt32BE(at + 8), sfnt.readUInt32BE(at + 12)];
      expect(offset % 4, tag).toBe(0);
      // The head table's checksum is taken with its checkSumAdjustment field as zero (spec).
      const data = Buffer.from(sfnt.subarray(offset, offset + length));
      if (tag === 'head') data.writeUInt32BE(0, 8);
      expect(tableChecksum(data), tag).toBe(checksum);
    }
  });

  it('refuses a file that is not WOFF 1.0', () => {
    expect(() => woffToSfnt(fs.readFileSync(path.join(LATO, 'lato-latin-400-normal.woff2')))).toThrow(/WOFF 1\.0/);
  });
});
